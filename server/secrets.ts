// The one list of secret values this repository publishes (defaults, tests, docs, the fakes).
// They are fine on a developer's machine and never in production: loadConfig refuses them there.
// tests/api/secrets.test.ts greps the repository for secret-like strings and fails when one found
// there is not refused, so a new test value must either start with a prefix below or be added here.

/** Exact values that appear in the repository. */
export const PUBLISHED_SECRETS = [
  'sk_test_kneepoint_local',
  'whsec_kneepoint_local',
  'test-secret-not-for-production',
  'whsec_kneepoint_test',
  'whsec_kneepoint_e2e',
  'whsec_someone_else',
  'whsec_other',
  'sk_test_fake',
  'sk_live_oops',
  'top-secret-value',
] as const;

/** Anything starting with these is one of the repository's development or test values. */
export const PUBLISHED_SECRET_PREFIXES = ['sk_test_kneepoint', 'rk_test_kneepoint', 'whsec_kneepoint', 'test-secret', 'kneepoint-'] as const;

/** The secrets a production server must be given, each its own. */
export const PRODUCTION_SECRETS = ['SESSION_SECRET', 'PAYMENTS_API_KEY', 'PAYMENTS_WEBHOOK_SECRET'] as const;

const MIN_LENGTH = 16;

export function isPublishedSecret(value: string) {
  return (PUBLISHED_SECRETS as readonly string[]).includes(value) || PUBLISHED_SECRET_PREFIXES.some((p) => value.startsWith(p));
}

/** One line per production secret that is missing, too short or published in the repository. */
export function checkSecrets(env: NodeJS.ProcessEnv): string[] {
  const problems: string[] = [];
  for (const name of PRODUCTION_SECRETS) {
    const value = env[name]?.trim();
    if (!value) problems.push(`${name}: missing; a production server needs its own value`);
    else if (isPublishedSecret(value)) problems.push(`${name}: is a development or test value published in the repository; set this install's own`);
    else if (value.length < MIN_LENGTH) problems.push(`${name}: must be at least ${MIN_LENGTH} characters`);
  }
  return problems;
}
