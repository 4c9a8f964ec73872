import fs from 'node:fs';
import { randomBytes } from 'node:crypto';

/**
 * The fake payment service's records and the operations on them. Objects are kept in
 * the shape the payment API returns (snake_case, `object` tags, lists as
 * `{ object: 'list', data }`), so the server can send them as they are. Every change
 * that the real service would announce emits an event for the webhook sender.
 */
export const API_VERSION = '2026-10-28.endive';
export const CURRENCY = 'eur';

/** Card numbers the payment service documents for testing, and what each does here. */
export const TEST_CARDS: Record<string, { outcome: 'succeeds' } | { outcome: 'declined'; code: string; message: string }> = {
  '4242424242424242': { outcome: 'succeeds' },
  '4000000000000002': { outcome: 'declined', code: 'generic_decline', message: 'Your card was declined.' },
  '4000000000009995': { outcome: 'declined', code: 'insufficient_funds', message: 'Your card has insufficient funds.' },
};

type Json = Record<string, unknown>;

export interface Customer extends Json {
  id: string;
  object: 'customer';
  created: number;
  email: string | null;
  name: string | null;
  metadata: Record<string, string>;
  /** Negative = credit the next invoice uses first (in cents). */
  balance: number;
  currency: string;
  invoice_settings: { default_payment_method: string | null };
  livemode: false;
}

export interface Product extends Json {
  id: string;
  object: 'product';
  name: string;
  active: boolean;
  metadata: Record<string, string>;
  created: number;
  livemode: false;
}

export interface Price extends Json {
  id: string;
  object: 'price';
  active: boolean;
  currency: string;
  unit_amount: number;
  type: 'recurring';
  recurring: { interval: 'month' | 'year'; interval_count: number };
  product: string;
  lookup_key: string | null;
  nickname: string | null;
  metadata: Record<string, string>;
  created: number;
  livemode: false;
}

export interface CheckoutSession extends Json {
  id: string;
  object: 'checkout.session';
  mode: 'subscription';
  status: 'open' | 'complete' | 'expired';
  payment_status: 'unpaid' | 'paid';
  customer: string;
  client_reference_id: string | null;
  success_url: string;
  cancel_url: string | null;
  metadata: Record<string, string>;
  subscription: string | null;
  invoice: string | null;
  amount_total: number;
  currency: string;
  url: string | null;
  created: number;
  expires_at: number;
  livemode: false;
}

export interface SubscriptionItem extends Json {
  id: string;
  object: 'subscription_item';
  price: Price;
  quantity: number;
  current_period_start: number;
  current_period_end: number;
}

export interface Subscription extends Json {
  id: string;
  object: 'subscription';
  customer: string;
  status: 'active' | 'past_due' | 'canceled' | 'incomplete';
  items: { object: 'list'; data: SubscriptionItem[]; has_more: false; url: string };
  current_period_start: number;
  current_period_end: number;
  cancel_at_period_end: boolean;
  cancel_at: number | null;
  canceled_at: number | null;
  ended_at: number | null;
  metadata: Record<string, string>;
  latest_invoice: string | null;
  default_payment_method: string | null;
  currency: string;
  created: number;
  start_date: number;
  livemode: false;
}

export interface InvoiceLine extends Json {
  id: string;
  object: 'line_item';
  description: string;
  amount: number;
  currency: string;
  proration: boolean;
  period: { start: number; end: number };
}

export interface Invoice extends Json {
  id: string;
  object: 'invoice';
  /** null on a preview, which is never issued. */
  number: string | null;
  customer: string;
  subscription: string | null;
  parent: { type: 'subscription_details'; subscription_details: { subscription: string; metadata: Record<string, string> } } | null;
  status: 'draft' | 'open' | 'paid' | 'void' | 'uncollectible';
  billing_reason: 'subscription_create' | 'subscription_cycle' | 'subscription_update';
  amount_due: number;
  amount_paid: number;
  amount_remaining: number;
  subtotal: number;
  total: number;
  starting_balance: number;
  ending_balance: number;
  currency: string;
  created: number;
  period_start: number;
  period_end: number;
  lines: { object: 'list'; data: InvoiceLine[]; has_more: false; url: string };
  status_transitions: { finalized_at: number | null; paid_at: number | null };
  hosted_invoice_url: string | null;
  livemode: false;
}

export interface ApiEvent extends Json {
  id: string;
  object: 'event';
  api_version: string;
  created: number;
  type: string;
  data: { object: Json; previous_attributes?: Json };
  livemode: false;
  pending_webhooks: number;
  request: { id: string | null; idempotency_key: string | null };
}

/** A card attached to a customer; only the test numbers above are accepted. */
export interface PaymentMethod extends Json {
  id: string;
  object: 'payment_method';
  type: 'card';
  customer: string;
  card: { brand: 'visa'; last4: string; exp_month: number; exp_year: number };
  created: number;
}

export interface PortalSession extends Json {
  id: string;
  object: 'billing_portal.session';
  customer: string;
  return_url: string | null;
  url: string;
  created: number;
  livemode: false;
}

interface Snapshot {
  seq: number;
  customers: Customer[];
  products: Product[];
  prices: Price[];
  sessions: CheckoutSession[];
  sessionInternals: [string, { lineItems: { price: string; quantity: number }[]; subscriptionMetadata: Record<string, string> }][];
  subscriptions: Subscription[];
  invoices: Invoice[];
  paymentMethods: PaymentMethod[];
  /** Prorations waiting for the next invoice, per subscription. */
  pendingItems: [string, InvoiceLine[]][];
  events: ApiEvent[];
  portalSessions?: PortalSession[];
}

export class FakeApiError extends Error {
  constructor(
    readonly status: number,
    readonly type: 'invalid_request_error' | 'card_error' | 'api_error' | 'authentication_error',
    message: string,
    readonly extra: { code?: string; param?: string; decline_code?: string } = {},
  ) {
    super(message);
  }

  toJSON() {
    return { error: { type: this.type, message: this.message, ...this.extra } };
  }
}

const notFound = (what: string, id: string, param = 'id') => new FakeApiError(404, 'invalid_request_error', `No such ${what}: '${id}'`, { code: 'resource_missing', param });

export const nowSeconds = () => Math.floor(Date.now() / 1000);

/** One calendar month after `start` (both in seconds), as the service bills monthly plans. */
/** Days in line descriptions as a person writes them ("2 Dec 2026", UTC). */
function lineDay(seconds: number): string {
  return new Date(seconds * 1000).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
}

export function addMonth(start: number): number {
  const d = new Date(start * 1000);
  const day = d.getUTCDate();
  d.setUTCDate(1);
  d.setUTCMonth(d.getUTCMonth() + 1);
  const lastDay = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 0)).getUTCDate();
  d.setUTCDate(Math.min(day, lastDay));
  return Math.floor(d.getTime() / 1000);
}

export function luhnValid(digits: string): boolean {
  let sum = 0;
  for (let i = 0; i < digits.length; i++) {
    let n = Number(digits[digits.length - 1 - i]);
    if (i % 2 === 1) {
      n *= 2;
      if (n > 9) n -= 9;
    }
    sum += n;
  }
  return digits.length >= 12 && sum % 10 === 0;
}

export interface CardInput {
  number: string;
  expiry: string;
  cvc: string;
  name?: string;
}

export class PaymentsState {
  seq = 0;
  customers = new Map<string, Customer>();
  products = new Map<string, Product>();
  prices = new Map<string, Price>();
  sessions = new Map<string, CheckoutSession>();
  sessionInternals = new Map<string, { lineItems: { price: string; quantity: number }[]; subscriptionMetadata: Record<string, string> }>();
  subscriptions = new Map<string, Subscription>();
  invoices = new Map<string, Invoice>();
  paymentMethods = new Map<string, PaymentMethod>();
  pendingItems = new Map<string, InvoiceLine[]>();
  events: ApiEvent[] = [];
  portalSessions = new Map<string, PortalSession>();
  /** Called for each new event; the webhook sender listens here. */
  onEvent: (event: ApiEvent) => void = () => undefined;

  constructor(
    private readonly publicUrl: () => string,
    private readonly file?: string,
  ) {
    if (file && fs.existsSync(file)) this.restore(JSON.parse(fs.readFileSync(file, 'utf8')) as Snapshot);
  }

  newId(prefix: string): string {
    this.seq++;
    return `${prefix}_${randomBytes(10).toString('base64url').replace(/[-_]/g, 'x')}`;
  }

  private restore(s: Snapshot) {
    this.seq = s.seq;
    this.customers = new Map(s.customers.map((x) => [x.id, x]));
    this.products = new Map(s.products.map((x) => [x.id, x]));
    this.prices = new Map(s.prices.map((x) => [x.id, x]));
    this.sessions = new Map(s.sessions.map((x) => [x.id, x]));
    this.sessionInternals = new Map(s.sessionInternals);
    this.subscriptions = new Map(s.subscriptions.map((x) => [x.id, x]));
    this.invoices = new Map(s.invoices.map((x) => [x.id, x]));
    this.paymentMethods = new Map(s.paymentMethods.map((x) => [x.id, x]));
    this.pendingItems = new Map(s.pendingItems);
    this.events = s.events;
    this.portalSessions = new Map((s.portalSessions ?? []).map((x) => [x.id, x]));
  }

  /** Write everything to the state file (when there is one) so a restart keeps customers and subscriptions. */
  save() {
    if (!this.file) return;
    const snapshot: Snapshot = {
      seq: this.seq,
      customers: [...this.customers.values()],
      products: [...this.products.values()],
      prices: [...this.prices.values()],
      sessions: [...this.sessions.values()],
      sessionInternals: [...this.sessionInternals],
      subscriptions: [...this.subscriptions.values()],
      invoices: [...this.invoices.values()],
      paymentMethods: [...this.paymentMethods.values()],
      pendingItems: [...this.pendingItems],
      events: this.events.slice(-500),
      portalSessions: [...this.portalSessions.values()].slice(-200),
    };
    const tmp = `${this.file}.tmp`;
    fs.writeFileSync(tmp, JSON.stringify(snapshot));
    fs.renameSync(tmp, this.file);
  }

  emit(type: string, object: Json, previous?: Json, idempotencyKey: string | null = null): ApiEvent {
    const event: ApiEvent = {
      id: this.newId('evt'),
      object: 'event',
      api_version: API_VERSION,
      created: nowSeconds(),
      type,
      // A snapshot: later changes to the object do not rewrite past events.
      data: { object: structuredClone(object), ...(previous ? { previous_attributes: previous } : {}) },
      livemode: false,
      pending_webhooks: 1,
      request: { id: null, idempotency_key: idempotencyKey },
    };
    this.events.push(event);
    // A long `npm start` keeps only recent events (replays need them; nothing older matters).
    if (this.events.length > 2000) this.events.splice(0, this.events.length - 2000);
    this.onEvent(event);
    return event;
  }

  // ---- customers, products, prices ----

  createCustomer(input: { email?: string; name?: string; metadata?: Record<string, string> }): Customer {
    const customer: Customer = {
      id: this.newId('cus'),
      object: 'customer',
      created: nowSeconds(),
      email: input.email ?? null,
      name: input.name ?? null,
      metadata: input.metadata ?? {},
      balance: 0,
      currency: CURRENCY,
      invoice_settings: { default_payment_method: null },
      livemode: false,
    };
    this.customers.set(customer.id, customer);
    this.emit('customer.created', customer);
    return customer;
  }

  customer(id: string): Customer {
    const c = this.customers.get(id);
    if (!c) throw notFound('customer', id, 'customer');
    return c;
  }

  createProduct(input: { name?: string; metadata?: Record<string, string> }): Product {
    if (!input.name) throw new FakeApiError(400, 'invalid_request_error', 'Missing required param: name.', { param: 'name' });
    const product: Product = { id: this.newId('prod'), object: 'product', name: input.name, active: true, metadata: input.metadata ?? {}, created: nowSeconds(), livemode: false };
    this.products.set(product.id, product);
    return product;
  }

  createPrice(input: { currency?: string; unit_amount?: string; product?: string; productName?: string; interval?: string; lookup_key?: string; nickname?: string; metadata?: Record<string, string> }): Price {
    const amount = Number(input.unit_amount);
    if (!Number.isInteger(amount) || amount < 0) throw new FakeApiError(400, 'invalid_request_error', 'Invalid integer: unit_amount.', { param: 'unit_amount' });
    if (!input.currency) throw new FakeApiError(400, 'invalid_request_error', 'Missing required param: currency.', { param: 'currency' });
    let productId = input.product;
    if (productId && !this.products.has(productId)) throw notFound('product', productId, 'product');
    if (!productId) {
      if (!input.productName) throw new FakeApiError(400, 'invalid_request_error', 'Give product or product_data[name].', { param: 'product' });
      productId = this.createProduct({ name: input.productName }).id;
    }
    if (input.lookup_key && [...this.prices.values()].some((p) => p.lookup_key === input.lookup_key && p.active)) {
      throw new FakeApiError(400, 'invalid_request_error', `A price with lookup_key '${input.lookup_key}' already exists.`, { param: 'lookup_key' });
    }
    const interval = input.interval === 'year' ? 'year' : 'month';
    const price: Price = {
      id: this.newId('price'),
      object: 'price',
      active: true,
      currency: input.currency.toLowerCase(),
      unit_amount: amount,
      type: 'recurring',
      recurring: { interval, interval_count: 1 },
      product: productId,
      lookup_key: input.lookup_key ?? null,
      nickname: input.nickname ?? null,
      metadata: input.metadata ?? {},
      created: nowSeconds(),
      livemode: false,
    };
    this.prices.set(price.id, price);
    return price;
  }

  price(id: string, param = 'price'): Price {
    const p = this.prices.get(id);
    if (!p) throw notFound('price', id, param);
    return p;
  }

  // ---- checkout ----

  createCheckoutSession(input: {
    mode?: string;
    customer?: string;
    lineItems: { price?: string; quantity?: string }[];
    success_url?: string;
    cancel_url?: string;
    client_reference_id?: string;
    metadata?: Record<string, string>;
    subscriptionMetadata?: Record<string, string>;
  }): CheckoutSession {
    if (input.mode !== 'subscription') throw new FakeApiError(400, 'invalid_request_error', 'This service only supports mode=subscription.', { param: 'mode' });
    if (!input.success_url) throw new FakeApiError(400, 'invalid_request_error', 'Missing required param: success_url.', { param: 'success_url' });
    if (!input.customer) throw new FakeApiError(400, 'invalid_request_error', 'Missing required param: customer.', { param: 'customer' });
    this.customer(input.customer);
    if (input.lineItems.length !== 1) throw new FakeApiError(400, 'invalid_request_error', 'Give exactly one line item.', { param: 'line_items' });
    const lineItems = input.lineItems.map((li, i) => {
      const price = this.price(li.price ?? '', `line_items[${i}][price]`);
      return { price: price.id, quantity: Math.max(1, Number(li.quantity ?? 1) || 1) };
    });
    const total = lineItems.reduce((s, li) => s + this.price(li.price).unit_amount * li.quantity, 0);
    const id = `cs_test_${randomBytes(18).toString('base64url').replace(/[-_]/g, 'x')}`;
    const session: CheckoutSession = {
      id,
      object: 'checkout.session',
      mode: 'subscription',
      status: 'open',
      payment_status: 'unpaid',
      customer: input.customer,
      client_reference_id: input.client_reference_id ?? null,
      success_url: input.success_url,
      cancel_url: input.cancel_url ?? null,
      metadata: input.metadata ?? {},
      subscription: null,
      invoice: null,
      amount_total: total,
      currency: CURRENCY,
      url: null,
      created: nowSeconds(),
      expires_at: nowSeconds() + 24 * 3600,
      livemode: false,
    };
    this.sessions.set(id, session);
    this.sessionInternals.set(id, { lineItems, subscriptionMetadata: input.subscriptionMetadata ?? {} });
    return this.presentSession(session);
  }

  /** The session as sent to clients: its hosted page address follows the fake's current address. */
  presentSession(session: CheckoutSession): CheckoutSession {
    if (session.status === 'open' && session.expires_at <= nowSeconds()) session.status = 'expired';
    return { ...session, url: session.status === 'open' ? `${this.publicUrl()}/pay/${session.id}` : null };
  }

  session(id: string): CheckoutSession {
    const s = this.sessions.get(id);
    if (!s) throw notFound('checkout.session', id);
    return s;
  }

  sessionLineItems(id: string) {
    return (this.sessionInternals.get(id)?.lineItems ?? []).map((li) => ({ price: this.price(li.price), quantity: li.quantity }));
  }

  /** Check the card the hosted page received; throws a card_error for declines and typos. */
  checkCard(card: CardInput): string {
    const digits = card.number.replace(/[\s-]/g, '');
    if (!/^\d{12,19}$/.test(digits) || !luhnValid(digits)) throw new FakeApiError(402, 'card_error', 'The card number is not valid.', { code: 'incorrect_number', param: 'number' });
    const m = /^\s*(\d{1,2})\s*\/\s*(\d{2}|\d{4})\s*$/.exec(card.expiry);
    if (!m) throw new FakeApiError(402, 'card_error', 'Enter the expiry as MM / YY.', { code: 'invalid_expiry', param: 'expiry' });
    const month = Number(m[1]);
    const year = m[2].length === 2 ? 2000 + Number(m[2]) : Number(m[2]);
    const now = new Date();
    if (month < 1 || month > 12) throw new FakeApiError(402, 'card_error', 'The expiry month is not valid.', { code: 'invalid_expiry_month', param: 'expiry' });
    if (year < now.getUTCFullYear() || (year === now.getUTCFullYear() && month < now.getUTCMonth() + 1)) {
      throw new FakeApiError(402, 'card_error', 'The card has expired.', { code: 'expired_card', param: 'expiry' });
    }
    if (!/^\d{3,4}$/.test(card.cvc.trim())) throw new FakeApiError(402, 'card_error', 'The security code is not valid.', { code: 'invalid_cvc', param: 'cvc' });
    const known = TEST_CARDS[digits];
    if (!known) {
      throw new FakeApiError(402, 'card_error', 'This is a test payment service: use one of its test card numbers (4242 4242 4242 4242 succeeds).', { code: 'card_declined', decline_code: 'test_mode_live_card', param: 'number' });
    }
    if (known.outcome === 'declined') throw new FakeApiError(402, 'card_error', known.message, { code: 'card_declined', decline_code: known.code, param: 'number' });
    return digits;
  }

  private attachCard(customer: Customer, digits: string, expiry: string): PaymentMethod {
    const [mm, yy] = expiry.split('/').map((x) => Number(x.trim()));
    const pm: PaymentMethod = {
      id: this.newId('pm'),
      object: 'payment_method',
      type: 'card',
      customer: customer.id,
      card: { brand: 'visa', last4: digits.slice(-4), exp_month: mm, exp_year: yy < 100 ? 2000 + yy : yy },
      created: nowSeconds(),
    };
    this.paymentMethods.set(pm.id, pm);
    customer.invoice_settings.default_payment_method = pm.id;
    return pm;
  }

  /**
   * The hosted page's "pay" button: a good card completes the session, creates the
   * subscription and its first paid invoice; a declined card changes nothing.
   */
  payCheckoutSession(id: string, card: CardInput): CheckoutSession {
    const session = this.session(id);
    if (this.presentSession(session).status !== 'open') throw new FakeApiError(400, 'invalid_request_error', 'This checkout is no longer open.', { code: 'checkout_not_open' });
    const digits = this.checkCard(card);
    const customer = this.customer(session.customer);
    const pm = this.attachCard(customer, digits, card.expiry);
    const internals = this.sessionInternals.get(id)!;
    const start = nowSeconds();
    const end = addMonth(start);
    const subId = this.newId('sub');
    const items: SubscriptionItem[] = internals.lineItems.map((li) => ({
      id: this.newId('si'),
      object: 'subscription_item',
      price: this.price(li.price),
      quantity: li.quantity,
      current_period_start: start,
      current_period_end: end,
    }));
    const sub: Subscription = {
      id: subId,
      object: 'subscription',
      customer: customer.id,
      status: 'active',
      items: { object: 'list', data: items, has_more: false, url: `/v1/subscription_items?subscription=${subId}` },
      current_period_start: start,
      current_period_end: end,
      cancel_at_period_end: false,
      cancel_at: null,
      canceled_at: null,
      ended_at: null,
      metadata: internals.subscriptionMetadata,
      latest_invoice: null,
      default_payment_method: pm.id,
      currency: CURRENCY,
      created: start,
      start_date: start,
      livemode: false,
    };
    this.subscriptions.set(sub.id, sub);
    const lines = items.map((it) => this.line(`${it.quantity} × ${this.productName(it.price)} (${this.periodLabel(start, end)})`, it.price.unit_amount * it.quantity, start, end, false));
    const invoice = this.chargeInvoice(sub, 'subscription_create', lines, start, end);
    session.status = 'complete';
    session.payment_status = 'paid';
    session.subscription = sub.id;
    session.invoice = invoice.id;
    this.emit('customer.subscription.created', sub);
    this.emit('invoice.paid', invoice);
    this.emit('checkout.session.completed', this.presentSession(session));
    return this.presentSession(session);
  }

  private productName(price: Price): string {
    return this.products.get(price.product)?.name ?? price.nickname ?? price.id;
  }

  private periodLabel(start: number, end: number): string {
    return `${lineDay(start)} – ${lineDay(end)}`;
  }

  private line(description: string, amount: number, start: number, end: number, proration: boolean): InvoiceLine {
    return { id: this.newId('il'), object: 'line_item', description, amount, currency: CURRENCY, proration, period: { start, end } };
  }

  /** Create an invoice for lines, use the customer's credit first, and charge the rest to the saved card. */
  private chargeInvoice(sub: Subscription, reason: Invoice['billing_reason'], lines: InvoiceLine[], start: number, end: number): Invoice {
    const customer = this.customer(sub.customer);
    const subtotal = lines.reduce((s, l) => s + l.amount, 0);
    const startingBalance = customer.balance;
    // Credit (negative balance) reduces what is due; a negative total becomes new credit.
    const total = subtotal + startingBalance;
    const due = Math.max(0, total);
    customer.balance = Math.min(0, total);
    const now = nowSeconds();
    const count = [...this.invoices.values()].filter((i) => i.customer === customer.id).length + 1;
    const invoice: Invoice = {
      id: this.newId('in'),
      object: 'invoice',
      number: `${customer.id.slice(4, 12).toUpperCase()}-${String(count).padStart(4, '0')}`,
      customer: customer.id,
      subscription: sub.id,
      parent: { type: 'subscription_details', subscription_details: { subscription: sub.id, metadata: sub.metadata } },
      status: 'paid',
      billing_reason: reason,
      amount_due: due,
      amount_paid: due,
      amount_remaining: 0,
      subtotal,
      total: subtotal,
      starting_balance: startingBalance,
      ending_balance: customer.balance,
      currency: CURRENCY,
      created: now,
      period_start: start,
      period_end: end,
      lines: { object: 'list', data: lines, has_more: false, url: '/v1/invoices/lines' },
      status_transitions: { finalized_at: now, paid_at: now },
      hosted_invoice_url: null,
      livemode: false,
    };
    invoice.hosted_invoice_url = `${this.publicUrl()}/invoice/${invoice.id}`;
    this.invoices.set(invoice.id, invoice);
    sub.latest_invoice = invoice.id;
    return invoice;
  }

  // ---- subscriptions ----

  subscription(id: string): Subscription {
    const s = this.subscriptions.get(id);
    if (!s) throw notFound('subscription', id);
    return s;
  }

  /**
   * Change a subscription: a new price (proration computed here, for the unused part
   * of the period) and/or cancel_at_period_end. `always_invoice` bills an upgrade's
   * difference at once and keeps a downgrade's as credit; `create_prorations` leaves
   * the difference for the next renewal; `none` ignores it.
   */
  updateSubscription(id: string, input: { items: { id?: string; price?: string }[]; cancel_at_period_end?: boolean; proration_behavior?: string; metadata?: Record<string, string> }): Subscription {
    const sub = this.subscription(id);
    if (sub.status === 'canceled') throw new FakeApiError(400, 'invalid_request_error', 'A canceled subscription can no longer be changed.', { code: 'subscription_canceled' });
    const previous: Record<string, unknown> = {};
    let invoice: Invoice | null = null;
    const change = input.items.find((i) => i.price);
    if (change) {
      const item = change.id ? sub.items.data.find((i) => i.id === change.id) : sub.items.data[0];
      if (!item) throw new FakeApiError(400, 'invalid_request_error', `No such subscription item: '${change.id}'`, { param: 'items[0][id]' });
      const newPrice = this.price(change.price!, 'items[0][price]');
      if (newPrice.id !== item.price.id) {
        previous.items = structuredClone(sub.items);
        const now = nowSeconds();
        const lines = this.prorationLines(sub, item, newPrice, now);
        item.price = newPrice;
        const behaviour = input.proration_behavior ?? 'create_prorations';
        if (behaviour === 'always_invoice') {
          invoice = this.chargeInvoice(sub, 'subscription_update', lines, now, sub.current_period_end);
        } else if (behaviour === 'create_prorations') {
          this.pendingItems.set(sub.id, [...(this.pendingItems.get(sub.id) ?? []), ...lines]);
        }
      }
    }
    if (input.cancel_at_period_end !== undefined && input.cancel_at_period_end !== sub.cancel_at_period_end) {
      previous.cancel_at_period_end = sub.cancel_at_period_end;
      sub.cancel_at_period_end = input.cancel_at_period_end;
      sub.cancel_at = input.cancel_at_period_end ? sub.current_period_end : null;
      sub.canceled_at = input.cancel_at_period_end ? nowSeconds() : null;
    }
    if (input.metadata) {
      previous.metadata = { ...sub.metadata };
      sub.metadata = { ...sub.metadata, ...input.metadata };
    }
    if (Object.keys(previous).length) this.emit('customer.subscription.updated', sub, previous);
    if (invoice) this.emit('invoice.paid', invoice);
    return sub;
  }

  /** The two proration lines of a price change now: credit for the old price's unused time, charge for the new one's. */
  private prorationLines(sub: Subscription, item: Subscription['items']['data'][number], newPrice: Price, now: number): InvoiceLine[] {
    const span = Math.max(1, sub.current_period_end - sub.current_period_start);
    const unused = Math.min(1, Math.max(0, (sub.current_period_end - now) / span));
    const after = lineDay(now);
    return [
      this.line(`Unused time on ${this.productName(item.price)} after ${after}`, -Math.round(item.price.unit_amount * item.quantity * unused), now, sub.current_period_end, true),
      this.line(`Remaining time on ${this.productName(newPrice)} after ${after}`, Math.round(newPrice.unit_amount * item.quantity * unused), now, sub.current_period_end, true),
    ];
  }

  /**
   * The invoice a price change would produce now (the API's invoices/create_preview),
   * changing nothing: lines, the customer's credit used first, what would be charged
   * and the credit left after.
   */
  previewSubscriptionChange(id: string, input: { items: { id?: string; price?: string }[]; proration_behavior?: string }): Invoice {
    const sub = this.subscription(id);
    const customer = this.customer(sub.customer);
    const change = input.items.find((i) => i.price);
    const item = change?.id ? sub.items.data.find((i) => i.id === change.id) : sub.items.data[0];
    if (!item) throw new FakeApiError(400, 'invalid_request_error', `No such subscription item: '${change?.id}'`, { param: 'subscription_details[items][0][id]' });
    const now = nowSeconds();
    const newPrice = change?.price ? this.price(change.price, 'subscription_details[items][0][price]') : item.price;
    const lines = newPrice.id === item.price.id || input.proration_behavior === 'none' ? [] : this.prorationLines(sub, item, newPrice, now);
    const subtotal = lines.reduce((t, l) => t + l.amount, 0);
    const total = subtotal + customer.balance;
    return {
      id: `upcoming_${sub.id}`,
      object: 'invoice',
      number: null,
      customer: customer.id,
      subscription: sub.id,
      parent: { type: 'subscription_details', subscription_details: { subscription: sub.id, metadata: sub.metadata } },
      status: 'draft',
      billing_reason: 'subscription_update',
      amount_due: Math.max(0, total),
      amount_paid: 0,
      amount_remaining: Math.max(0, total),
      subtotal,
      total: subtotal,
      starting_balance: customer.balance,
      ending_balance: Math.min(0, total),
      currency: CURRENCY,
      created: now,
      period_start: now,
      period_end: sub.current_period_end,
      lines: { object: 'list', data: lines, has_more: false, url: '/v1/invoices/lines' },
      status_transitions: { finalized_at: null, paid_at: null },
      hosted_invoice_url: null,
      livemode: false,
    };
  }

  /** End a subscription at once (the API's DELETE). */
  cancelSubscription(id: string): Subscription {
    const sub = this.subscription(id);
    if (sub.status === 'canceled') return sub;
    sub.status = 'canceled';
    sub.ended_at = nowSeconds();
    sub.canceled_at ??= sub.ended_at;
    this.emit('customer.subscription.deleted', sub);
    return sub;
  }

  /**
   * Test control: let the current period of a subscription run out now. One set to
   * cancel ends; any other renews for a month with a new paid invoice (prorations
   * and credit included).
   */
  endPeriod(id: string): Subscription {
    const sub = this.subscription(id);
    if (sub.status === 'canceled') return sub;
    if (sub.cancel_at_period_end) {
      sub.status = 'canceled';
      sub.ended_at = sub.current_period_end;
      this.emit('customer.subscription.deleted', sub);
      return sub;
    }
    const previous = { current_period_start: sub.current_period_start, current_period_end: sub.current_period_end };
    const start = sub.current_period_end;
    const end = addMonth(start);
    sub.current_period_start = start;
    sub.current_period_end = end;
    for (const item of sub.items.data) {
      item.current_period_start = start;
      item.current_period_end = end;
    }
    const lines = [
      ...(this.pendingItems.get(sub.id) ?? []),
      ...sub.items.data.map((it) => this.line(`${it.quantity} × ${this.productName(it.price)} (${this.periodLabel(start, end)})`, it.price.unit_amount * it.quantity, start, end, false)),
    ];
    this.pendingItems.delete(sub.id);
    const invoice = this.chargeInvoice(sub, 'subscription_cycle', lines, start, end);
    this.emit('customer.subscription.updated', sub, previous);
    this.emit('invoice.paid', invoice);
    return sub;
  }

  // ---- self-service page ----

  createPortalSession(customerId: string | undefined, returnUrl: string | undefined): PortalSession {
    if (!customerId) throw new FakeApiError(400, 'invalid_request_error', 'Missing required param: customer.', { param: 'customer' });
    this.customer(customerId);
    const id = this.newId('bps');
    const session: PortalSession = { id, object: 'billing_portal.session', customer: customerId, return_url: returnUrl ?? null, url: `${this.publicUrl()}/portal/${id}`, created: nowSeconds(), livemode: false };
    this.portalSessions.set(id, session);
    return session;
  }

  portalSession(id: string): PortalSession {
    const s = this.portalSessions.get(id);
    if (!s || s.created < nowSeconds() - 3600) throw notFound('billing_portal.session', id);
    return { ...s, url: `${this.publicUrl()}/portal/${id}` };
  }

  /** The card on file of a customer, if any. */
  defaultCard(customerId: string): PaymentMethod | null {
    const pmId = this.customer(customerId).invoice_settings.default_payment_method;
    return pmId ? (this.paymentMethods.get(pmId) ?? null) : null;
  }

  /** Replace the card on file (and on the customer's live subscriptions); declines leave the old card. */
  replaceCard(customerId: string, card: CardInput): PaymentMethod {
    const digits = this.checkCard(card);
    const customer = this.customer(customerId);
    const pm = this.attachCard(customer, digits, card.expiry);
    for (const sub of this.subscriptions.values()) {
      if (sub.customer === customerId && sub.status !== 'canceled') sub.default_payment_method = pm.id;
    }
    this.emit('payment_method.attached', pm);
    this.emit('customer.updated', customer, { invoice_settings: {} });
    return pm;
  }

  invoice(id: string): Invoice {
    const i = this.invoices.get(id);
    if (!i) throw notFound('invoice', id);
    return i;
  }

  event(id: string): ApiEvent {
    const e = this.events.find((x) => x.id === id);
    if (!e) throw notFound('event', id);
    return e;
  }
}
