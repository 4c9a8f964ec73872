export { answerAllowance, assertCanPublish, assertRowsAllowed, workspacePlan, type AnswerAllowance } from './limits';
export { startCheckout, checkoutStatus, changePlan, cancelAtPeriodEnd, resumeSubscription } from './subscriptions';
export { processWebhook } from './webhooks';
export { billingSummary, listInvoices } from './summary';
