import { createHmac } from 'node:crypto';
import type { ApiEvent } from './state';

/**
 * Signs events the way the payment SDK's `webhooks.constructEvent` verifies them
 * (`Stripe-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256(secret, "t.payload")>`)
 * and posts them to the configured endpoint, retrying failures with backoff. Every
 * attempt is recorded so tests can see what was delivered.
 */
export function signPayload(payload: string, secret: string, timestamp = Math.floor(Date.now() / 1000)): string {
  const v1 = createHmac('sha256', secret).update(`${timestamp}.${payload}`, 'utf8').digest('hex');
  return `t=${timestamp},v1=${v1}`;
}

export interface DeliveryAttempt {
  at: string;
  status: number | null;
  error: string | null;
  /** 'send' for the normal delivery and its retries, 'replay' for a test-requested resend. */
  reason: 'send' | 'replay';
}

export interface DeliveryRecord {
  eventId: string;
  type: string;
  state: 'pending' | 'delivered' | 'failed';
  attempts: DeliveryAttempt[];
}

export interface WebhookSenderOptions {
  /** Where events go; no URL means events are only recorded. */
  url?: string;
  secret: string;
  /** First retry delay; each further retry doubles it. */
  retryBaseMs?: number;
  maxAttempts?: number;
  timeoutMs?: number;
}

export class WebhookSender {
  readonly deliveries = new Map<string, DeliveryRecord>();
  private paused = false;
  private held: ApiEvent[] = [];
  private timers = new Set<NodeJS.Timeout>();
  private inFlight = new Set<Promise<void>>();
  private stopped = false;

  constructor(private readonly opts: WebhookSenderOptions) {}

  get url() {
    return this.opts.url;
  }

  setUrl(url: string | undefined) {
    this.opts.url = url;
  }

  /** Hold new deliveries (tests use this to see a page before the webhook lands). */
  pause() {
    this.paused = true;
  }

  resume() {
    this.paused = false;
    const held = this.held.splice(0);
    for (const e of held) this.send(e);
  }

  send(event: ApiEvent) {
    if (this.stopped) return;
    if (!this.deliveries.has(event.id)) this.deliveries.set(event.id, { eventId: event.id, type: event.type, state: 'pending', attempts: [] });
    if (this.paused) {
      this.held.push(event);
      return;
    }
    this.attempt(event, 1, 'send');
  }

  /** Resend an event with a fresh signature (same id and body), as the service's "resend" does. */
  async replay(event: ApiEvent): Promise<DeliveryAttempt> {
    if (!this.deliveries.has(event.id)) this.deliveries.set(event.id, { eventId: event.id, type: event.type, state: 'pending', attempts: [] });
    return this.post(event, 'replay');
  }

  private attempt(event: ApiEvent, n: number, reason: 'send') {
    const p = this.post(event, reason).then((result) => {
      const record = this.deliveries.get(event.id)!;
      if (result.status !== null && result.status >= 200 && result.status < 300) return;
      if (n >= (this.opts.maxAttempts ?? 8) || this.stopped) {
        record.state = 'failed';
        return;
      }
      const delay = (this.opts.retryBaseMs ?? 1000) * 2 ** (n - 1);
      const timer = setTimeout(() => {
        this.timers.delete(timer);
        this.attempt(event, n + 1, reason);
      }, delay);
      timer.unref?.();
      this.timers.add(timer);
    });
    this.inFlight.add(p);
    void p.finally(() => this.inFlight.delete(p));
  }

  private async post(event: ApiEvent, reason: DeliveryAttempt['reason']): Promise<DeliveryAttempt> {
    const record = this.deliveries.get(event.id)!;
    const attempt: DeliveryAttempt = { at: new Date().toISOString(), status: null, error: null, reason };
    if (!this.opts.url) {
      attempt.error = 'no webhook endpoint configured';
    } else {
      const payload = JSON.stringify(event, null, 2);
      try {
        const res = await fetch(this.opts.url, {
          method: 'POST',
          headers: { 'content-type': 'application/json; charset=utf-8', 'stripe-signature': signPayload(payload, this.opts.secret), 'user-agent': 'PartwiseFakePayments/1.0' },
          body: payload,
          signal: AbortSignal.timeout(this.opts.timeoutMs ?? 10_000),
        });
        attempt.status = res.status;
        if (!res.ok) attempt.error = (await res.text()).slice(0, 300);
        else await res.arrayBuffer();
      } catch (e) {
        attempt.error = String((e as Error).message);
      }
    }
    record.attempts.push(attempt);
    if (attempt.status !== null && attempt.status >= 200 && attempt.status < 300) record.state = 'delivered';
    return attempt;
  }

  /** Resolves once nothing is being sent or waiting for a retry (or the time runs out). */
  async idle(timeoutMs = 10_000): Promise<boolean> {
    const until = Date.now() + timeoutMs;
    while (Date.now() < until) {
      if (this.inFlight.size === 0 && this.timers.size === 0) return true;
      await Promise.race([...this.inFlight, new Promise((r) => setTimeout(r, 20))]);
    }
    return false;
  }

  stop() {
    this.stopped = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
  }
}
