import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { bool, list, obj, parseForm, str, stringMap, type FormObject } from './form';
import { checkoutPage, closedCheckoutPage, invoicePage, notFoundPage, portalView } from './pages';
import { FakeApiError, PaymentsState, type ApiEvent } from './state';
import { WebhookSender, type DeliveryRecord } from './webhooks';

/**
 * A small stand-in for the payment service on loopback. It answers the API subset
 * Partwise calls through the official SDK (form-encoded requests, JSON objects
 * shaped like the real ones), serves a hosted checkout page with a card form, and
 * sends signed webhook events with retries. Test-only controls live under /_test and
 * answer only requests carrying the control key (CONTROL_KEY_HEADER), random per run
 * and handed to the tests in the environment (PAYMENTS_FAKE_CONTROL_KEY): without it,
 * anyone who reaches the fake could pay checkouts, replay events or end periods.
 */
export const CONTROL_KEY_HEADER = 'x-fake-control-key';

/** Headers for a /_test control call. */
export function controlHeaders(key: string | undefined): Record<string, string> {
  return key ? { [CONTROL_KEY_HEADER]: key } : {};
}

export interface PaymentsFakeOptions {
  port?: number;
  host?: string;
  /** The API key clients must send; a random test key when omitted. */
  secretKey?: string;
  webhookSecret?: string;
  /** The key /_test controls require; random when omitted. */
  controlKey?: string;
  /** Where to post events (Partwise's webhook route). */
  webhookUrl?: string;
  /** Keep records across restarts in this JSON file. */
  stateFile?: string;
  retryBaseMs?: number;
  maxAttempts?: number;
  merchantName?: string;
}

export interface PaymentsFake {
  url: string;
  host: string;
  port: number;
  secretKey: string;
  webhookSecret: string;
  /** Send it in CONTROL_KEY_HEADER to use the /_test controls. */
  controlKey: string;
  state: PaymentsState;
  webhooks: WebhookSender;
  /** The next `count` API calls answer `status` (500 by default) without doing anything. */
  failNext(count?: number, status?: number): void;
  /** The next `count` API calls wait `ms` first. */
  slowNext(ms: number, count?: number): void;
  /** The environment Partwise needs to reach this fake. */
  env(): Record<string, string>;
  stop(): Promise<void>;
}

const MAX_BODY = 1024 * 1024;

function readBody(req: http.IncomingMessage): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    req.on('data', (c: Buffer) => {
      size += c.length;
      if (size > MAX_BODY) {
        reject(new FakeApiError(413, 'invalid_request_error', 'Request body too large.'));
        req.destroy();
      } else chunks.push(c);
    });
    req.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')));
    req.on('error', reject);
  });
}

function sendJson(res: http.ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}) {
  const text = JSON.stringify(body);
  res.writeHead(status, { 'content-type': 'application/json', 'content-length': Buffer.byteLength(text), 'request-id': `req_${randomBytes(8).toString('hex')}`, ...headers });
  res.end(text);
}

function sendHtml(res: http.ServerResponse, status: number, html: string) {
  res.writeHead(status, { 'content-type': 'text/html; charset=utf-8', 'cache-control': 'no-store', 'x-frame-options': 'DENY' });
  res.end(html);
}

function listOf<T>(url: string, items: T[], limit?: string) {
  const n = Math.min(100, Math.max(1, Number(limit ?? 10) || 10));
  return { object: 'list', url, has_more: items.length > n, data: items.slice(0, n) };
}

/** Loopback "localhost" may resolve to ::1 first while servers bind 127.0.0.1. */
function loopbackUrl(url: string | undefined): string | undefined {
  if (!url) return url;
  const u = new URL(url);
  if (u.hostname === 'localhost') u.hostname = '127.0.0.1';
  return u.toString();
}

export async function startPaymentsFake(opts: PaymentsFakeOptions = {}): Promise<PaymentsFake> {
  const host = opts.host ?? '127.0.0.1';
  const secretKey = opts.secretKey ?? `sk_test_${randomBytes(18).toString('hex')}`;
  const webhookSecret = opts.webhookSecret ?? `whsec_${randomBytes(24).toString('hex')}`;
  const controlKey = opts.controlKey ?? `ctl_${randomBytes(24).toString('hex')}`;
  const merchant = opts.merchantName ?? 'Partwise';
  let baseUrl = '';
  const state = new PaymentsState(() => baseUrl, opts.stateFile);
  const webhooks = new WebhookSender({ url: loopbackUrl(opts.webhookUrl), secret: webhookSecret, retryBaseMs: opts.retryBaseMs, maxAttempts: opts.maxAttempts });
  state.onEvent = (event) => webhooks.send(event);

  const failures: { status: number }[] = [];
  const delays: number[] = [];
  /** Responses by idempotency key, so the SDK's retried POSTs do not act twice. */
  const idempotent = new Map<string, { status: number; body: unknown }>();

  async function api(method: string, path: string, params: FormObject, idempotencyKey: string | null): Promise<unknown> {
    const seg = path.split('/').filter(Boolean).slice(1); // drop "v1"
    const [a, b, c] = seg;
    const meta = () => stringMap(params.metadata);

    if (a === 'customers' && !b && method === 'POST') return state.createCustomer({ email: str(params.email), name: str(params.name), metadata: meta() });
    if (a === 'customers' && b && !c && method === 'GET') return state.customer(b);
    if (a === 'customers' && b && !c && method === 'POST') {
      const customer = state.customer(b);
      if (str(params.email)) customer.email = str(params.email)!;
      if (str(params.name)) customer.name = str(params.name)!;
      if (params.metadata) customer.metadata = { ...customer.metadata, ...meta() };
      return customer;
    }

    if (a === 'products' && !b && method === 'POST') return state.createProduct({ name: str(params.name), metadata: meta() });
    if (a === 'products' && b && method === 'GET') {
      const p = state.products.get(b);
      if (!p) throw new FakeApiError(404, 'invalid_request_error', `No such product: '${b}'`, { code: 'resource_missing', param: 'id' });
      return p;
    }

    if (a === 'prices' && !b && method === 'POST') {
      return state.createPrice({
        currency: str(params.currency),
        unit_amount: str(params.unit_amount),
        product: str(params.product),
        productName: str(obj(params.product_data).name),
        interval: str(obj(params.recurring).interval),
        lookup_key: str(params.lookup_key),
        nickname: str(params.nickname),
        metadata: meta(),
      });
    }
    if (a === 'prices' && !b && method === 'GET') {
      const keys = list(params.lookup_keys).filter((k): k is string => typeof k === 'string');
      const active = bool(params.active);
      const items = [...state.prices.values()].filter((p) => (!keys.length || (p.lookup_key !== null && keys.includes(p.lookup_key))) && (active === undefined || p.active === active)).reverse();
      return listOf('/v1/prices', items, str(params.limit));
    }
    if (a === 'prices' && b && method === 'GET') return state.price(b, 'id');

    if (a === 'checkout' && b === 'sessions' && !c && method === 'POST') {
      return state.createCheckoutSession({
        mode: str(params.mode),
        customer: str(params.customer),
        lineItems: list(params.line_items).map((li) => ({ price: str(obj(li).price), quantity: str(obj(li).quantity) })),
        success_url: str(params.success_url),
        cancel_url: str(params.cancel_url),
        client_reference_id: str(params.client_reference_id),
        metadata: meta(),
        subscriptionMetadata: stringMap(obj(params.subscription_data).metadata),
      });
    }
    if (a === 'checkout' && b === 'sessions' && c && method === 'GET') return state.presentSession(state.session(c));

    if (a === 'subscriptions' && !b && method === 'GET') {
      const customer = str(params.customer);
      const status = str(params.status);
      const items = [...state.subscriptions.values()].filter((s) => (!customer || s.customer === customer) && (!status || status === 'all' || s.status === status)).reverse();
      return listOf('/v1/subscriptions', items, str(params.limit));
    }
    if (a === 'subscriptions' && b && method === 'GET') return state.subscription(b);
    if (a === 'subscriptions' && b && method === 'POST') {
      return state.updateSubscription(b, {
        items: list(params.items).map((i) => ({ id: str(obj(i).id), price: str(obj(i).price) })),
        cancel_at_period_end: bool(params.cancel_at_period_end),
        proration_behavior: str(params.proration_behavior),
        metadata: params.metadata ? meta() : undefined,
      });
    }
    if (a === 'subscriptions' && b && method === 'DELETE') return state.cancelSubscription(b);

    if (a === 'invoices' && !b && method === 'GET') {
      const customer = str(params.customer);
      const subscription = str(params.subscription);
      const items = [...state.invoices.values()].filter((i) => (!customer || i.customer === customer) && (!subscription || i.subscription === subscription)).reverse();
      return listOf('/v1/invoices', items, str(params.limit));
    }
    if (a === 'invoices' && b === 'create_preview' && method === 'POST') {
      const details = obj(params.subscription_details);
      return state.previewSubscriptionChange(str(params.subscription) ?? '', {
        items: list(details.items).map((i) => ({ id: str(obj(i).id), price: str(obj(i).price) })),
        proration_behavior: str(details.proration_behavior),
      });
    }
    if (a === 'invoices' && b && method === 'GET') return state.invoice(b);

    if (a === 'events' && b && method === 'GET') return state.event(b);

    if (a === 'billing_portal' && b === 'sessions' && !c && method === 'POST') return state.createPortalSession(str(params.customer), str(params.return_url));

    void idempotencyKey;
    throw new FakeApiError(404, 'invalid_request_error', `Unrecognized request URL (${method}: ${path}). This local fake implements only the calls Partwise makes.`);
  }

  function authorised(req: http.IncomingMessage): boolean {
    const header = req.headers.authorization ?? '';
    if (header.startsWith('Bearer ')) return header.slice(7) === secretKey;
    if (header.startsWith('Basic ')) return Buffer.from(header.slice(6), 'base64').toString().split(':')[0] === secretKey;
    return false;
  }

  function describeDelivery(e: ApiEvent): { id: string; type: string; created: number; delivery: DeliveryRecord | null } {
    return { id: e.id, type: e.type, created: e.created, delivery: webhooks.deliveries.get(e.id) ?? null };
  }

  function controlAuthorised(req: http.IncomingMessage): boolean {
    const sent = Buffer.from(String(req.headers[CONTROL_KEY_HEADER] ?? ''));
    const expected = Buffer.from(controlKey);
    return sent.length === expected.length && timingSafeEqual(sent, expected);
  }

  async function control(req: http.IncomingMessage, res: http.ServerResponse, path: string) {
    if (!controlAuthorised(req)) throw new FakeApiError(401, 'authentication_error', `Test controls need the control key in the ${CONTROL_KEY_HEADER} header.`);
    const text = req.method === 'POST' ? await readBody(req) : '';
    const body = text ? (JSON.parse(text) as Record<string, unknown>) : {};
    const parts = path.split('/').filter(Boolean).slice(1); // drop "_test"
    const [a, b, c] = parts;
    if (a === 'events' && !b && req.method === 'GET') return sendJson(res, 200, { data: state.events.map(describeDelivery) });
    if (a === 'events' && b && !c && req.method === 'GET') return sendJson(res, 200, { event: state.event(b), delivery: webhooks.deliveries.get(b) ?? null });
    if (a === 'events' && b && c === 'replay' && req.method === 'POST') return sendJson(res, 200, { attempt: await webhooks.replay(state.event(b)) });
    if (a === 'fail-next' && req.method === 'POST') {
      failNext(Number(body.count ?? 1), Number(body.status ?? 500));
      return sendJson(res, 200, { failing: failures.length });
    }
    if (a === 'slow-next' && req.method === 'POST') {
      slowNext(Number(body.ms ?? 1000), Number(body.count ?? 1));
      return sendJson(res, 200, { slow: delays.length });
    }
    if (a === 'webhooks' && b === 'pause' && req.method === 'POST') {
      webhooks.pause();
      return sendJson(res, 200, { paused: true });
    }
    if (a === 'webhooks' && b === 'resume' && req.method === 'POST') {
      webhooks.resume();
      return sendJson(res, 200, { paused: false });
    }
    if (a === 'subscriptions' && b && c === 'end-period' && req.method === 'POST') {
      const sub = state.endPeriod(b);
      state.save();
      return sendJson(res, 200, sub);
    }
    if (a === 'checkout' && b && c === 'pay' && req.method === 'POST') {
      const session = state.payCheckoutSession(b, { number: String(body.number ?? ''), expiry: String(body.expiry ?? ''), cvc: String(body.cvc ?? '') });
      state.save();
      return sendJson(res, 200, session);
    }
    throw new FakeApiError(404, 'invalid_request_error', `No test control at ${req.method} ${path}.`);
  }

  async function hostedPage(req: http.IncomingMessage, res: http.ServerResponse, url: URL) {
    const [kind, id] = url.pathname.split('/').filter(Boolean);
    if (kind === 'invoice') {
      const invoice = state.invoices.get(id ?? '');
      return invoice ? sendHtml(res, 200, invoicePage(invoice, merchant)) : sendHtml(res, 404, notFoundPage('invoice'));
    }
    const session = state.sessions.get(id ?? '');
    if (!session) return sendHtml(res, 404, notFoundPage('checkout'));
    const view = () => ({
      session: state.presentSession(session),
      merchant,
      items: state.sessionLineItems(session.id).map((li) => ({ ...li, productName: state.products.get(li.price.product)?.name ?? li.price.id })),
    });
    if (state.presentSession(session).status !== 'open') return sendHtml(res, 410, closedCheckoutPage(state.presentSession(session)));
    if (req.method === 'GET') return sendHtml(res, 200, checkoutPage(view()));
    if (req.method !== 'POST') return sendHtml(res, 405, notFoundPage('page'));
    const form = new URLSearchParams(await readBody(req));
    const card = { number: form.get('number') ?? '', expiry: form.get('expiry') ?? '', cvc: form.get('cvc') ?? '', name: form.get('name') ?? '' };
    try {
      const paid = state.payCheckoutSession(session.id, card);
      state.save();
      res.writeHead(303, { location: paid.success_url.replace('{CHECKOUT_SESSION_ID}', paid.id) });
      res.end();
    } catch (e) {
      if (!(e instanceof FakeApiError)) throw e;
      // Keep what was typed except the security code, as card forms do.
      sendHtml(res, 402, checkoutPage({ ...view(), error: { message: e.message, field: e.extra.param }, values: { number: card.number, expiry: card.expiry, name: card.name } }));
    }
  }

  /** The self-service page: card on file, replace it, end or keep the subscription. */
  async function portalPage(req: http.IncomingMessage, res: http.ServerResponse, url: URL) {
    const [, id, action] = url.pathname.split('/').filter(Boolean);
    let session;
    try {
      session = state.portalSession(id ?? '');
    } catch {
      return sendHtml(res, 404, notFoundPage('self-service link (they last an hour)'));
    }
    const subs = [...state.subscriptions.values()].filter((s) => s.customer === session.customer && s.status !== 'canceled');
    const view = (notice?: { kind: 'ok' | 'error'; text: string }) =>
      portalView({ session, merchant, card: state.defaultCard(session.customer), subscriptions: subs.map((s) => ({ sub: s, productName: state.products.get(s.items.data[0]?.price.product ?? '')?.name ?? 'Plan' })), notice });
    if (req.method === 'GET') return sendHtml(res, 200, view());
    if (req.method !== 'POST') return sendHtml(res, 405, notFoundPage('page'));
    const form = new URLSearchParams(await readBody(req));
    try {
      if (action === 'card') {
        state.replaceCard(session.customer, { number: form.get('number') ?? '', expiry: form.get('expiry') ?? '', cvc: form.get('cvc') ?? '' });
        state.save();
        return sendHtml(res, 200, view({ kind: 'ok', text: 'The new card is saved and will be used for the next invoices.' }));
      }
      if (action === 'cancel' || action === 'resume') {
        const sub = subs.find((s) => s.id === form.get('subscription'));
        if (!sub) return sendHtml(res, 404, view({ kind: 'error', text: 'That subscription is not yours or has ended.' }));
        state.updateSubscription(sub.id, { items: [], cancel_at_period_end: action === 'cancel' });
        state.save();
        return sendHtml(res, 200, view({ kind: 'ok', text: action === 'cancel' ? 'The subscription ends with the current period.' : 'The subscription continues.' }));
      }
    } catch (e) {
      if (!(e instanceof FakeApiError)) throw e;
      return sendHtml(res, 402, view({ kind: 'error', text: e.message }));
    }
    return sendHtml(res, 404, notFoundPage('page'));
  }

  const server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? '/', 'http://fake.local');
    try {
      if (url.pathname === '/health') return sendJson(res, 200, { ok: true });
      if (url.pathname.startsWith('/_test/')) return await control(req, res, url.pathname);
      if (url.pathname.startsWith('/pay/') || url.pathname.startsWith('/invoice/')) return await hostedPage(req, res, url);
      if (url.pathname.startsWith('/portal/')) return await portalPage(req, res, url);
      if (!url.pathname.startsWith('/v1/')) return sendHtml(res, 404, notFoundPage('page'));

      if (!authorised(req)) throw new FakeApiError(401, 'authentication_error', 'Invalid API Key provided.');
      const delay = delays.shift();
      if (delay) await new Promise((r) => setTimeout(r, delay));
      const failure = failures.shift();
      if (failure) return sendJson(res, failure.status, new FakeApiError(failure.status, 'api_error', 'The payment service had a problem (a failure requested by a test).').toJSON(), { 'stripe-should-retry': 'false' });

      const method = req.method ?? 'GET';
      const text = method === 'GET' || method === 'DELETE' ? url.search.slice(1) : await readBody(req);
      const key = method === 'POST' ? ((req.headers['idempotency-key'] as string | undefined) ?? null) : null;
      const cacheKey = key ? `${url.pathname}:${key}` : null;
      if (cacheKey && idempotent.has(cacheKey)) {
        const hit = idempotent.get(cacheKey)!;
        return sendJson(res, hit.status, hit.body, { 'idempotent-replayed': 'true' });
      }
      let status = 200;
      let body: unknown;
      try {
        body = await api(method, url.pathname, parseForm(text), key);
        state.save();
      } catch (e) {
        if (!(e instanceof FakeApiError)) throw e;
        status = e.status;
        body = e.toJSON();
      }
      if (cacheKey) idempotent.set(cacheKey, { status, body });
      return sendJson(res, status, body);
    } catch (e) {
      if (e instanceof FakeApiError) return sendJson(res, e.status, e.toJSON());
      console.error('[payments-fake]', e);
      return sendJson(res, 500, { error: { type: 'api_error', message: 'The fake payment service failed.' } });
    }
  });

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, host, () => resolve());
  });
  const port = (server.address() as AddressInfo).port;
  baseUrl = `http://${host}:${port}`;

  function failNext(count = 1, status = 500) {
    for (let i = 0; i < count; i++) failures.push({ status });
  }
  function slowNext(ms: number, count = 1) {
    for (let i = 0; i < count; i++) delays.push(ms);
  }

  return {
    url: baseUrl,
    host,
    port,
    secretKey,
    webhookSecret,
    controlKey,
    state,
    webhooks,
    failNext,
    slowNext,
    env: () => ({
      STRIPE_SECRET_KEY: secretKey,
      STRIPE_WEBHOOK_SECRET: webhookSecret,
      STRIPE_API_HOST: host,
      STRIPE_API_PORT: String(port),
      STRIPE_API_PROTOCOL: 'http',
      PAYMENTS_FAKE_URL: baseUrl,
      PAYMENTS_FAKE_CONTROL_KEY: controlKey,
    }),
    async stop() {
      webhooks.stop();
      server.closeAllConnections?.();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
