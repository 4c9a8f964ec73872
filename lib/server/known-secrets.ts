/**
 * Secrets that are public because they are (or were) written in this repository: the
 * payment fake's old fixed keys, the test stacks' and benchmarks' session secrets,
 * the integration tests' values. Anyone who has read the source can sign with them, so
 * a deployment refuses to start with any of them (lib/server/settings.ts) and the
 * payment fake never adopts one from the environment (lib/fakes/payments/service.ts).
 */
export const KNOWN_SESSION_SECRETS: readonly string[] = [
  'build-phase-placeholder',
  'test-stack-secret-not-for-production',
  'integration-test-secret-not-for-production',
  'system-test-secret-0123456789-abcdef',
  'bench-embed-secret-not-for-production',
  'bench-load-secret-not-for-production',
];

export const KNOWN_PAYMENT_KEYS: readonly string[] = ['sk_test_partwise_local_fake', 'sk_test_catalogue', 'sk_test_restart', 'sk_test_wrong'];

export const KNOWN_WEBHOOK_SECRETS: readonly string[] = ['whsec_partwise_local_fake_signing_secret', 'whsec_catalogue_secret', 'whsec_someone_else'];

export function isKnownSecret(list: readonly string[], value: string | undefined): boolean {
  return value !== undefined && list.includes(value.trim());
}
