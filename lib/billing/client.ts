import Stripe from 'stripe';
import { AppError } from '@/lib/errors';

/**
 * The one payment-service client, from the environment: STRIPE_SECRET_KEY, and
 * STRIPE_API_HOST / STRIPE_API_PORT / STRIPE_API_PROTOCOL to reach the local fake (or
 * the real service when unset). Cached per configuration; safe to lose.
 */
export interface PaymentsConfig {
  secretKey: string;
  host?: string;
  port?: number;
  protocol?: 'http' | 'https';
  webhookSecret?: string;
}

export function paymentsConfig(env: NodeJS.ProcessEnv = process.env): PaymentsConfig | null {
  const secretKey = env.STRIPE_SECRET_KEY?.trim();
  if (!secretKey) return null;
  const protocol = env.STRIPE_API_PROTOCOL === 'http' ? 'http' : env.STRIPE_API_PROTOCOL === 'https' ? 'https' : undefined;
  return {
    secretKey,
    host: env.STRIPE_API_HOST?.trim() || undefined,
    port: env.STRIPE_API_PORT ? Number(env.STRIPE_API_PORT) : undefined,
    protocol,
    webhookSecret: env.STRIPE_WEBHOOK_SECRET?.trim() || undefined,
  };
}

const cache = new Map<string, Stripe>();

export function paymentsClient(): Stripe {
  const config = paymentsConfig();
  if (!config) throw new AppError('unavailable', 'Billing is not set up on this server (STRIPE_SECRET_KEY is missing). Nothing was charged and the plan is unchanged.');
  const key = JSON.stringify(config);
  let client = cache.get(key);
  if (!client) {
    client = new Stripe(config.secretKey, {
      host: config.host,
      port: config.port,
      protocol: config.protocol,
      // One quick retry for a dropped connection; the owner is waiting on the page.
      maxNetworkRetries: 1,
      timeout: 15_000,
      telemetry: false,
      appInfo: { name: 'Partwise' },
    });
    cache.set(key, client);
  }
  return client;
}

export function webhookSecret(): string {
  const secret = paymentsConfig()?.webhookSecret;
  if (!secret) throw new AppError('unavailable', 'Webhooks are not set up on this server (STRIPE_WEBHOOK_SECRET is missing).');
  return secret;
}

/**
 * A failed payment-service call → an AppError the owner can act on. Unreachable or
 * failing service → 502/503 saying nothing changed; our own bad request → 502 too
 * (it is not the owner's fault), with the service's message kept in the server log.
 */
export function paymentsError(error: unknown, doing: string): AppError {
  if (error instanceof AppError) return error;
  const e = error as { type?: string; message?: string; statusCode?: number };
  const nothingChanged = 'Nothing was charged and your plan is unchanged.';
  switch (e?.type) {
    case 'StripeConnectionError':
      return new AppError('unavailable', `The payment service could not be reached while ${doing}. ${nothingChanged} Please try again in a minute.`, { cause: error });
    case 'StripeAPIError':
    case 'StripeRateLimitError':
      return new AppError('upstream_failed', `The payment service reported a problem while ${doing}. ${nothingChanged} Please try again in a minute.`, { cause: error });
    case 'StripeAuthenticationError':
    case 'StripePermissionError':
      console.error('[billing] payment service refused our credentials:', e.message);
      return new AppError('upstream_failed', `Billing is misconfigured on this server, so ${doing} failed. ${nothingChanged}`, { cause: error });
    case 'StripeInvalidRequestError':
    case 'StripeIdempotencyError':
      console.error(`[billing] payment service rejected a request while ${doing}:`, e.message);
      return new AppError('upstream_failed', `The payment service did not accept the request while ${doing}. ${nothingChanged}`, { cause: error });
    default:
      return AppError.from(error);
  }
}

/** Run a payment-service call, turning its failures into AppErrors. */
export async function callPayments<T>(doing: string, fn: (client: Stripe) => Promise<T>): Promise<T> {
  const client = paymentsClient();
  try {
    return await fn(client);
  } catch (error) {
    throw paymentsError(error, doing);
  }
}
