/**
 * Oscillab's own signing keys for the learning platform: RS256 key pairs made and used through
 * jose. The active key signs token-request assertions and deep-linking responses; rotating makes a
 * new active key and retires the old one, which stays in the published key set for a grace period
 * so that a platform's cached copy and tokens already in flight still verify.
 */
import { calculateJwkThumbprint, exportJWK, exportPKCS8, generateKeyPair, importPKCS8, SignJWT, type JWK, type JWTPayload } from 'jose';
import { Op, type Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { models } from '@/models';
import { limits } from './config';

const ALG = 'RS256';
const imported = new Map<string, CryptoKey>();

async function makeKey(transaction?: Transaction) {
  const { publicKey, privateKey } = await generateKeyPair(ALG, { extractable: true, modulusLength: 2048 });
  const jwk = await exportJWK(publicKey);
  const kid = await calculateJwkThumbprint(jwk);
  const pem = await exportPKCS8(privateKey);
  return models().LtiToolKey.create(
    { kid, publicJwk: JSON.stringify({ ...jwk, kid, alg: ALG, use: 'sig' }), privateKeyPem: pem, status: 'active', retiredAt: null },
    { transaction },
  );
}

/** The key that signs now; made on first use. */
export async function activeToolKey(): Promise<{ kid: string; key: CryptoKey }> {
  const { LtiToolKey } = models();
  let row = await LtiToolKey.findOne({ where: { status: 'active' }, order: [['id', 'DESC']] });
  if (!row) {
    await sequelize().transaction(async (t) => {
      if (!(await LtiToolKey.findOne({ where: { status: 'active' }, transaction: t }))) await makeKey(t);
    });
    row = await LtiToolKey.findOne({ where: { status: 'active' }, order: [['id', 'DESC']] });
  }
  let key = imported.get(row!.kid);
  if (!key) {
    key = await importPKCS8(row!.privateKeyPem, ALG);
    imported.set(row!.kid, key);
  }
  return { kid: row!.kid, key };
}

/** A new active key; the previous one is retired (still published for the grace period). */
/** POST /api/lti/keys's answer. */
export type KeyRotated = { kid: string; retired: string[] };

export async function rotateToolKey(actorId: number | null): Promise<KeyRotated> {
  const { LtiToolKey } = models();
  return sequelize().transaction(async (t) => {
    const old = await LtiToolKey.findAll({ where: { status: 'active' }, transaction: t });
    await LtiToolKey.update({ status: 'retired', retiredAt: new Date() }, { where: { status: 'active' }, transaction: t });
    const fresh = await makeKey(t);
    await audit(
      {
        actorId,
        action: 'lti.key.rotate',
        entityType: 'lti_tool_key',
        entityId: fresh.id,
        before: { active: old.map((k) => k.kid) },
        after: { active: fresh.kid },
      },
      t,
    );
    return { kid: fresh.kid, retired: old.map((k) => k.kid) };
  });
}

/** The public keys the platform may see signatures from: the active one and those retired within the grace period. */
export async function publishedToolKeys(): Promise<JWK[]> {
  const since = new Date(Date.now() - limits.retiredKeyGraceMs());
  const rows = await models().LtiToolKey.findAll({
    where: { [Op.or]: [{ status: 'active' }, { status: 'retired', retiredAt: { [Op.gte]: since } }] },
    order: [['id', 'DESC']],
  });
  return rows.map((r) => JSON.parse(r.publicJwk) as JWK);
}

export async function toolKeySummary() {
  const since = Date.now() - limits.retiredKeyGraceMs();
  const rows = await models().LtiToolKey.findAll({ order: [['id', 'DESC']], limit: 10 });
  return rows.map((r) => ({
    kid: r.kid,
    status: r.status,
    createdAt: r.createdAt.toISOString(),
    retiredAt: r.retiredAt?.toISOString() ?? null,
    published: r.status === 'active' || (r.retiredAt !== null && r.retiredAt.getTime() >= since),
  }));
}

/** A JWT signed with the active key (kid in the header). */
export async function signAsTool(
  payload: JWTPayload,
  options: { audience: string; issuer: string; expiresInSeconds: number; subject?: string },
): Promise<string> {
  const { kid, key } = await activeToolKey();
  let jwt = new SignJWT(payload)
    .setProtectedHeader({ alg: ALG, kid, typ: 'JWT' })
    .setIssuer(options.issuer)
    .setAudience(options.audience)
    .setIssuedAt()
    .setExpirationTime(`${options.expiresInSeconds}s`);
  if (options.subject) jwt = jwt.setSubject(options.subject);
  return jwt.sign(key);
}
