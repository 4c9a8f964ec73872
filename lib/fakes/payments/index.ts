export { startPaymentsFake, controlHeaders, CONTROL_KEY_HEADER, type PaymentsFake, type PaymentsFakeOptions } from './server';
export { signPayload, WebhookSender, type DeliveryRecord, type DeliveryAttempt } from './webhooks';
export { PaymentsState, TEST_CARDS, API_VERSION, type ApiEvent } from './state';
export { parseForm } from './form';
