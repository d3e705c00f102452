/** Addresses and limits of the learning-platform connection, read from the environment. */

/** Oscillab's public origin: the launch, login and key set URLs the platform's administrator copies are built on it. */
export function toolOrigin(): string {
  return new URL(process.env.NEXTAUTH_URL || 'http://localhost:3000').origin;
}

export function toolUrls() {
  const origin = toolOrigin();
  return {
    login: `${origin}/api/lti/login`,
    launch: `${origin}/api/lti/launch`,
    deepLink: `${origin}/api/lti/launch`,
    keySet: `${origin}/api/lti/jwks`,
  };
}

/** Under https the state cookie gets the Secure flag and the __Host- prefix. */
export const secureCookies = () => toolOrigin().startsWith('https:');

const num = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v >= 0 ? v : fallback;
};

export const limits = {
  /** Clock difference tolerated on exp / iat / nbf (LTI Core 1.3 asks for a small leeway). */
  skewSeconds: () => num('LTI_CLOCK_SKEW_S', 60),
  /** How long a login initiation stays usable. */
  stateSeconds: 600,
  /** Larger id_tokens are refused before anything is parsed. */
  maxIdTokenBytes: 16_384,
  /** Timeout of every call to the platform (key set, token, roster, scores). */
  fetchTimeoutMs: () => num('LTI_FETCH_TIMEOUT_MS', 5000),
  /** A platform key set is fetched again after this long, or at once for an unknown key id (at most once per cooldown). */
  keySetMaxAgeMs: () => num('LTI_KEYSET_MAX_AGE_MS', 6 * 3600_000),
  keySetCooldownMs: () => num('LTI_KEYSET_COOLDOWN_MS', 30_000),
  /** A retired Oscillab key stays in the published key set this long, for tokens and caches still in flight. */
  retiredKeyGraceMs: () => num('LTI_KEY_GRACE_HOURS', 24) * 3600_000,
  maxResponseBytes: 2_000_000,
};

/** Platform URLs must be https, except on this machine's loopback (the local fake platform). */
export function isAcceptablePlatformUrl(value: string): boolean {
  let url: URL;
  try {
    url = new URL(value);
  } catch {
    return false;
  }
  if (url.username || url.password) return false;
  if (url.protocol === 'https:') return true;
  return url.protocol === 'http:' && ['localhost', '127.0.0.1', '[::1]'].includes(url.hostname);
}
