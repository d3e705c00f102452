/**
 * The platforms' public key sets, fetched from each registration's key set URL and kept in memory.
 * A token signed with a key id not in the cached set makes Oscillab fetch the set again (a platform
 * that rotated its key), at most once per cooldown, so forged key ids cannot make it hammer the
 * platform. Keys are matched and imported by jose's local key set.
 */
import { createLocalJWKSet, errors, type JSONWebKeySet, type JWTHeaderParameters, type FlattenedJWSInput } from 'jose';
import { limits } from './config';
import { platformJson, PlatformAnswered, PlatformUnreachable } from './fetch';

export class KeySetUnavailable extends Error {}
export class UnknownKey extends Error {}

type Entry = { set: ReturnType<typeof createLocalJWKSet>; kids: string[]; fetchedAt: number };
const cache = new Map<string, Entry>();
const lastAttempt = new Map<string, number>();

async function load(url: string): Promise<Entry> {
  lastAttempt.set(url, Date.now());
  let data: JSONWebKeySet;
  try {
    ({ data } = await platformJson<JSONWebKeySet>(url, { headers: { accept: 'application/json' } }));
  } catch (error) {
    if (error instanceof PlatformUnreachable || error instanceof PlatformAnswered) throw new KeySetUnavailable(error.message);
    throw error;
  }
  if (!data || !Array.isArray(data.keys)) throw new KeySetUnavailable(`The key set at ${url} is not a JSON Web Key Set.`);
  let set: Entry['set'];
  try {
    set = createLocalJWKSet(data);
  } catch {
    throw new KeySetUnavailable(`The key set at ${url} could not be read.`);
  }
  const entry = { set, kids: data.keys.map((k) => String(k.kid ?? '')), fetchedAt: Date.now() };
  cache.set(url, entry);
  return entry;
}

/** A key resolver for jose's jwtVerify, for one platform key set URL. */
export function platformKeyResolver(url: string) {
  return async (header: JWTHeaderParameters, token: FlattenedJWSInput) => {
    let entry = cache.get(url);
    if (!entry || Date.now() - entry.fetchedAt > limits.keySetMaxAgeMs()) entry = await load(url);
    try {
      return await entry.set(header, token);
    } catch (error) {
      if (!(error instanceof errors.JWKSNoMatchingKey)) throw error;
      const since = Date.now() - (lastAttempt.get(url) ?? 0);
      if (since < limits.keySetCooldownMs()) throw new UnknownKey(`No key "${header.kid ?? ''}" in the platform's key set.`);
      entry = await load(url);
      try {
        return await entry.set(header, token);
      } catch (again) {
        if (again instanceof errors.JWKSNoMatchingKey) throw new UnknownKey(`No key "${header.kid ?? ''}" in the platform's key set.`);
        throw again;
      }
    }
  };
}

/** Forget cached key sets (tests; an administrator changing a registration's key set URL). */
export function forgetPlatformKeys(url?: string) {
  if (url) {
    cache.delete(url);
    lastAttempt.delete(url);
  } else {
    cache.clear();
    lastAttempt.clear();
  }
}
