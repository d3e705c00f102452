/**
 * A small stand-in for a department's learning platform, for the demo and the tests: it speaks the
 * 1EdTech LTI 1.3 / LTI Advantage message formats (OIDC third-party login, id_token launches,
 * Deep Linking 2.0, Names and Role Provisioning Services 2.0, Assignment and Grade Services 2.0,
 * client-credentials tokens with private_key_jwt) and nothing else. It runs on loopback in its own
 * process, with one invented course of the fictional Northmere University.
 *
 *   npx tsx scripts/fake-platform.ts            (port FAKE_PLATFORM_PORT, default 3030)
 *
 * Environment: FAKE_PLATFORM_PORT, OSCILLAB_URL (default http://localhost:3000),
 * FAKE_PLATFORM_STATE (a JSON file that keeps placed items, gradebook and keys between restarts),
 * FAKE_PLATFORM_DEMO_PRACTICAL (an Oscillab practical id: an item opening it is placed at first start,
 * as deep linking would have placed it).
 * The /control/… endpoints change the stand-in's behaviour for tests and the demo (rotate its key,
 * take the grade service down); they exist only here.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import {
  calculateJwkThumbprint,
  createLocalJWKSet,
  exportJWK,
  generateKeyPair,
  importJWK,
  jwtVerify,
  SignJWT,
  type JSONWebKeySet,
  type JWK,
  type JWTPayload,
} from 'jose';

const PORT = Number(process.env.FAKE_PLATFORM_PORT || 3030);
const BASE = `http://127.0.0.1:${PORT}`;
const TOOL = (process.env.OSCILLAB_URL || 'http://localhost:3000').replace(/\/$/, '');
const CLIENT_ID = process.env.FAKE_PLATFORM_CLIENT_ID || 'oscillab-northmere';
const DEPLOYMENT_ID = process.env.FAKE_PLATFORM_DEPLOYMENT_ID || 'northmere-main';
const STATE_FILE = process.env.FAKE_PLATFORM_STATE || '';
const TOOL_LOGIN = `${TOOL}/api/lti/login`;
const TOOL_LAUNCH = `${TOOL}/api/lti/launch`;
const TOOL_JWKS = `${TOOL}/api/lti/jwks`;

const LTI = {
  messageType: 'https://purl.imsglobal.org/spec/lti/claim/message_type',
  version: 'https://purl.imsglobal.org/spec/lti/claim/version',
  deploymentId: 'https://purl.imsglobal.org/spec/lti/claim/deployment_id',
  targetLinkUri: 'https://purl.imsglobal.org/spec/lti/claim/target_link_uri',
  resourceLink: 'https://purl.imsglobal.org/spec/lti/claim/resource_link',
  roles: 'https://purl.imsglobal.org/spec/lti/claim/roles',
  context: 'https://purl.imsglobal.org/spec/lti/claim/context',
  custom: 'https://purl.imsglobal.org/spec/lti/claim/custom',
  toolPlatform: 'https://purl.imsglobal.org/spec/lti/claim/tool_platform',
  presentation: 'https://purl.imsglobal.org/spec/lti/claim/launch_presentation',
  dlSettings: 'https://purl.imsglobal.org/spec/lti-dl/claim/deep_linking_settings',
  dlItems: 'https://purl.imsglobal.org/spec/lti-dl/claim/content_items',
  dlData: 'https://purl.imsglobal.org/spec/lti-dl/claim/data',
  dlMsg: 'https://purl.imsglobal.org/spec/lti-dl/claim/msg',
  nrps: 'https://purl.imsglobal.org/spec/lti-nrps/claim/namesroleservice',
  ags: 'https://purl.imsglobal.org/spec/lti-ags/claim/endpoint',
};
const SCOPES = {
  lineItem: 'https://purl.imsglobal.org/spec/lti-ags/scope/lineitem',
  score: 'https://purl.imsglobal.org/spec/lti-ags/scope/score',
  result: 'https://purl.imsglobal.org/spec/lti-ags/scope/result.readonly',
  roster: 'https://purl.imsglobal.org/spec/lti-nrps/scope/contextmembership.readonly',
};
const M = 'http://purl.imsglobal.org/vocab/lis/v2/membership#';
const TA = 'http://purl.imsglobal.org/vocab/lis/v2/membership/Instructor#TeachingAssistant';

// ——— State ————————————————————————————————————————————————————————————————

type User = {
  id: string;
  name: string;
  given_name: string;
  family_name: string;
  email: string;
  roles: string[];
  status: 'Active' | 'Inactive' | 'Deleted';
};
type Item = { id: string; title: string; custom: Record<string, string>; lineItemId: string | null; placedAt: string };
type LineItem = { id: string; label: string; scoreMaximum: number; resourceId?: string; resourceLinkId?: string; tag?: string };
type Result = {
  lineItemId: string;
  userId: string;
  scoreGiven: number;
  scoreMaximum: number;
  comment?: string;
  timestamp: string;
  activityProgress: string;
  gradingProgress: string;
  updatedAt: string;
};
type Delivery = { lineItemId: string; userId: string; scoreGiven: number; timestamp: string; receivedAt: string; applied: boolean };
type Key = { kid: string; privateJwk: JWK; publicJwk: JWK; active: boolean };
type State = {
  keys: Key[];
  course: { id: string; label: string; title: string };
  users: User[];
  items: Item[];
  lineItems: LineItem[];
  results: Result[];
  deliveries: Delivery[];
  deepLinkData: string[];
  down: { ags: boolean; jwks: boolean; token: boolean; roster: boolean };
};

const person = (
  id: string,
  given: string,
  family: string,
  email: string,
  roles: string[],
  status: User['status'] = 'Active',
  name = `${given} ${family}`.trim(),
): User => ({ id, name, given_name: given, family_name: family, email, roles, status });

/** An invented course of the fictional Northmere University; the e-mails match Oscillab's demo accounts where one exists. */
function initialState(): State {
  return {
    keys: [],
    course: { id: 'nmu-chem2041-2026', label: 'CHEM2041', title: 'CHEM2041 Physical Chemistry Laboratory II (2026)' },
    users: [
      person('nmu-8f31c0', 'Owen', 'Petrakis', 'instructor1@northmere.example', [`${M}Instructor`], 'Active', 'Dr Owen Petrakis'),
      person('nmu-2b77d4', 'Tomas', 'Vey', 'ta3@northmere.example', [`${M}Instructor`, TA]),
      person('nmu-5c09e2', 'Hollis', 'Brennan-Shaw', 'designer@northmere.example', [`${M}ContentDeveloper`]),
      person('nmu-91aa3f', 'Marguerite', 'Osei', 'courseadmin@northmere.example', [`${M}Administrator`]),
      person('nmu-40d1b8', 'Amara', 'Abernethy', 'student01@northmere.example', [`${M}Learner`]),
      person('nmu-40d1b9', 'Bram', 'Hartigan-Lowe', 'student02@northmere.example', [`${M}Learner`]),
      person('nmu-40d1ba', 'Celeste', 'Okafor', 'student03@northmere.example', [`${M}Learner`]),
      person('nmu-40d1d1', 'Vesna', 'Whitlock', 'student22@northmere.example', [`${M}Learner`]),
      person('nmu-40d1bc', 'Elin', 'Dunmore', 'student05@northmere.example', [`${M}Learner`], 'Inactive'),
      person('nmu-77e0f5', 'Ottilie', 'Frane', 'student61@northmere.example', [`${M}Learner`]),
      person('nmu-c3b6a0', 'Casimir', 'Dorn', 'mentor@northmere.example', [`${M}Mentor`]),
    ],
    items: [],
    lineItems: [],
    results: [],
    deliveries: [],
    deepLinkData: [],
    down: { ags: false, jwks: false, token: false, roster: false },
  };
}

let state: State = initialState();
function save() {
  if (STATE_FILE) fs.writeFileSync(STATE_FILE, JSON.stringify(state, null, 2), { mode: 0o600 });
}

async function newKey(): Promise<Key> {
  const { publicKey, privateKey } = await generateKeyPair('RS256', { extractable: true });
  const publicJwk = await exportJWK(publicKey);
  const kid = await calculateJwkThumbprint(publicJwk);
  return {
    kid,
    privateJwk: { ...(await exportJWK(privateKey)), kid, alg: 'RS256' },
    publicJwk: { ...publicJwk, kid, alg: 'RS256', use: 'sig' },
    active: true,
  };
}

async function init() {
  if (STATE_FILE) fs.mkdirSync(path.dirname(path.resolve(STATE_FILE)), { recursive: true });
  if (STATE_FILE && fs.existsSync(STATE_FILE)) {
    state = { ...initialState(), ...JSON.parse(fs.readFileSync(STATE_FILE, 'utf8')) };
    state.down = { ags: false, jwks: false, token: false, roster: false };
  }
  if (!state.keys.some((k) => k.active)) state.keys.push(await newKey());
  const demo = process.env.FAKE_PLATFORM_DEMO_PRACTICAL;
  if (demo && /^\d+$/.test(demo) && state.items.length === 0) {
    // As if an instructor had placed it earlier through deep linking: the item carries Oscillab's custom
    // parameter. It came without a gradebook column, so Oscillab makes one on the first release.
    const item = placeItem('HCl/DCl fundamental band', { oscillab_practical: demo });
    item.id = 'nmu-item-hcl';
  }
  save();
}

function placeItem(
  title: string,
  custom: Record<string, string>,
  lineItem?: { scoreMaximum: number; label?: string; resourceId?: string; tag?: string },
): Item {
  const item: Item = {
    id: `nmu-item-${crypto.randomBytes(4).toString('hex')}`,
    title,
    custom,
    lineItemId: null,
    placedAt: new Date().toISOString(),
  };
  if (lineItem && lineItem.scoreMaximum > 0) {
    const li: LineItem = {
      id: `${BASE}/api/lineitems/${crypto.randomBytes(4).toString('hex')}`,
      label: lineItem.label || title,
      scoreMaximum: lineItem.scoreMaximum,
      resourceId: lineItem.resourceId,
      tag: lineItem.tag,
      resourceLinkId: item.id,
    };
    state.lineItems.push(li);
    item.lineItemId = li.id;
  }
  state.items.push(item);
  return item;
}

// ——— Helpers ——————————————————————————————————————————————————————————————

const esc = (v: unknown) =>
  String(v ?? '').replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en-GB"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${esc(title)} · Northmere learning platform (local stand-in)</title>
<style>
  body { margin: 0; font: 15px/1.5 Georgia, 'Times New Roman', serif; background: #f4f1fa; color: #221b33; }
  header { background: #3b2a63; color: #fff; padding: .75rem 1.25rem; }
  header a { color: #fff; }
  header p { margin: 0; font-size: .8rem; opacity: .85; }
  main { max-width: 64rem; margin: 1.5rem auto; padding: 0 1.25rem; }
  section { background: #fff; border: 1px solid #d8d0e8; border-radius: 4px; padding: 1rem 1.25rem; margin-bottom: 1rem; }
  h1 { font-size: 1.3rem; margin: .25rem 0; } h2 { font-size: 1.1rem; margin: 0 0 .5rem; }
  table { border-collapse: collapse; width: 100%; font-size: .9rem; } th, td { border-bottom: 1px solid #e4def0; padding: .35rem .5rem; text-align: left; vertical-align: top; }
  button, .button { font: inherit; background: #3b2a63; color: #fff; border: 0; border-radius: 3px; padding: .3rem .7rem; cursor: pointer; text-decoration: none; display: inline-block; }
  button.quiet { background: #e9e3f5; color: #221b33; }
  form.inline { display: inline; }
  iframe { width: 100%; height: 70vh; border: 1px solid #d8d0e8; background: #fff; }
  .note { font-size: .85rem; color: #5a4f70; }
  code { font-size: .85rem; }
</style></head><body><header><a href="/"><strong>Northmere learning platform</strong></a><p>A local stand-in for the department's learning platform (Oscillab demo and tests). Northmere University is fictional.</p></header><main>${body}</main></body></html>`;
}

function send(
  res: http.ServerResponse,
  status: number,
  body: string,
  type = 'text/html; charset=utf-8',
  headers: Record<string, string> = {},
) {
  res.writeHead(status, { 'content-type': type, 'cache-control': 'no-store', ...headers });
  res.end(body);
}
const sendJson = (res: http.ServerResponse, status: number, body: unknown, type = 'application/json') =>
  send(res, status, JSON.stringify(body), type);

async function readBody(req: http.IncomingMessage, max = 256 * 1024): Promise<string> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req) {
    size += (chunk as Buffer).length;
    if (size > max) throw new Error('body too large');
    chunks.push(chunk as Buffer);
  }
  return Buffer.concat(chunks).toString('utf8');
}

function cookies(req: http.IncomingMessage): Record<string, string> {
  const out: Record<string, string> = {};
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0) out[part.slice(0, eq).trim()] = decodeURIComponent(part.slice(eq + 1).trim());
  }
  return out;
}

function autoPost(action: string, fields: Record<string, string>, title: string): string {
  const inputs = Object.entries(fields)
    .map(([k, v]) => `<input type="hidden" name="${esc(k)}" value="${esc(v)}">`)
    .join('');
  return page(
    title,
    `<section><p>${esc(title)}</p><form id="f" method="post" action="${esc(action)}">${inputs}<button type="submit">Continue</button></form></section><script>document.getElementById('f').submit()</script>`,
  );
}

const activeKey = () => state.keys.filter((k) => k.active).slice(-1)[0];

async function sign(payload: JWTPayload, header: Record<string, unknown> = {}): Promise<string> {
  const key = activeKey();
  return new SignJWT(payload)
    .setProtectedHeader({ alg: 'RS256', kid: key.kid, typ: 'JWT', ...header })
    .sign(await importJWK(key.privateJwk, 'RS256'));
}

// Oscillab's key set, fetched when a key id is not known yet (the tool rotated its key).
let toolKeys: { set: ReturnType<typeof createLocalJWKSet>; at: number } | null = null;
async function toolKeySet(force = false) {
  if (!toolKeys || force) {
    const res = await fetch(TOOL_JWKS, { signal: AbortSignal.timeout(5000) });
    if (!res.ok) throw new Error(`Oscillab's key set answered ${res.status}`);
    toolKeys = { set: createLocalJWKSet((await res.json()) as JSONWebKeySet), at: Date.now() };
  }
  return toolKeys.set;
}
async function verifyFromTool(jwt: string, audience: string) {
  const resolver = async (
    h: Parameters<ReturnType<typeof createLocalJWKSet>>[0],
    t: Parameters<ReturnType<typeof createLocalJWKSet>>[1],
  ) => {
    try {
      return await (
        await toolKeySet()
      )(h, t);
    } catch {
      return (await toolKeySet(true))(h, t);
    }
  };
  return jwtVerify(jwt, resolver, { issuer: CLIENT_ID, audience, algorithms: ['RS256'] });
}

const contextClaim = () => ({
  id: state.course.id,
  label: state.course.label,
  title: state.course.title,
  type: ['http://purl.imsglobal.org/vocab/lis/v2/course#CourseOffering'],
});
const servicesClaims = (item?: Item) => ({
  [LTI.ags]: {
    scope: [SCOPES.lineItem, SCOPES.score, SCOPES.result],
    lineitems: `${BASE}/api/courses/${state.course.id}/lineitems`,
    ...(item?.lineItemId ? { lineitem: item.lineItemId } : {}),
  },
  [LTI.nrps]: { context_memberships_url: `${BASE}/api/courses/${state.course.id}/memberships`, service_versions: ['2.0'] },
});

// ——— Access tokens (client credentials with Oscillab's signed assertion) ——————————————————

const tokens = new Map<string, { scopes: string[]; expiresAt: number }>();
const usedJti = new Set<string>();

function bearer(req: http.IncomingMessage, scope: string): boolean {
  const m = /^Bearer (.+)$/.exec(req.headers.authorization ?? '');
  const t = m && tokens.get(m[1]);
  return Boolean(t && t.expiresAt > Date.now() && t.scopes.includes(scope));
}

// ——— Routes ———————————————————————————————————————————————————————————————

type Handler = (req: http.IncomingMessage, res: http.ServerResponse, url: URL) => Promise<void>;
const routes: [string, RegExp, Handler][] = [];
const on = (method: string, pattern: RegExp, handler: Handler) => routes.push([method, pattern, handler]);

on('GET', /^\/health$/, async (_req, res) => sendJson(res, 200, { ok: true }));

on('GET', /^\/$/, async (req, res) => {
  const me = state.users.find((u) => u.id === cookies(req).fp_user);
  const items = state.items
    .map(
      (i) =>
        `<tr><td>${esc(i.title)}</td><td><code>${esc(i.id)}</code></td><td>${i.lineItemId ? 'graded' : '—'}</td><td><a class="button" href="/launch?item=${encodeURIComponent(i.id)}">Launch as…</a></td></tr>`,
    )
    .join('');
  const roster = state.users
    .map(
      (u) =>
        `<tr><td>${esc(u.name)}</td><td>${esc(u.email)}</td><td>${esc(u.roles.map((r) => r.split(/[#/]/).pop()).join(', '))}</td><td>${esc(u.status)}</td></tr>`,
    )
    .join('');
  const placers = state.users.filter(
    (u) =>
      u.status === 'Active' &&
      u.roles.some((r) => /#(Instructor|ContentDeveloper|Administrator)$/.test(r) && !r.includes('/Instructor#')) &&
      !u.roles.includes(TA),
  );
  send(
    res,
    200,
    page(
      'Course',
      `
    <h1>${esc(state.course.title)}</h1>
    <p class="note">${me ? `Signed in to the platform as ${esc(me.name)}.` : 'Choose a person to launch as; the platform then signs them in to Oscillab.'} Oscillab: <code>${esc(TOOL)}</code></p>
    <section><h2>Course items</h2>${items ? `<table><thead><tr><th>Item</th><th>Id</th><th>Gradebook</th><th></th></tr></thead><tbody>${items}</tbody></table>` : '<p>No items yet.</p>'}
      <form method="post" action="/as" class="inline" style="display:block;margin-top:.75rem"><input type="hidden" name="deeplink" value="1"><input type="hidden" name="mode" value="window">
      <label>Add an Oscillab item (deep linking) as <select name="user">${placers.map((u) => `<option value="${esc(u.id)}">${esc(u.name)}</option>`).join('')}</select></label> <button type="submit">Choose in Oscillab…</button></form></section>
    <section><h2>Gradebook</h2><p><a href="/gradebook">Open the gradebook</a> — scores Oscillab sent back.</p></section>
    <section><h2>Participants</h2><table><thead><tr><th>Name</th><th>E-mail</th><th>Roles</th><th>Status</th></tr></thead><tbody>${roster}</tbody></table></section>
    <section><h2>Stand-in controls</h2><p class="note">For trying Oscillab's behaviour when the platform misbehaves.</p>
      <form method="post" action="/control/ags" class="inline"><input type="hidden" name="down" value="${state.down.ags ? '0' : '1'}"><button class="quiet" type="submit">${state.down.ags ? 'Bring the grade service back' : 'Take the grade service down'}</button></form>
      <form method="post" action="/control/rotate-key" class="inline"><button class="quiet" type="submit">Rotate the platform's signing key</button></form></section>`,
    ),
  );
});

on('GET', /^\/launch$/, async (_req, res, url) => {
  const item = state.items.find((i) => i.id === url.searchParams.get('item'));
  if (!item) return send(res, 404, page('No such item', '<section><p>No such item.</p></section>'));
  const rows = state.users
    .map(
      (
        u,
      ) => `<tr><td>${esc(u.name)}</td><td>${esc(u.roles.map((r) => r.split(/[#/]/).pop()).join(', '))}${u.status !== 'Active' ? ` (${esc(u.status)})` : ''}</td><td>
      <form method="post" action="/as" class="inline"><input type="hidden" name="user" value="${esc(u.id)}"><input type="hidden" name="item" value="${esc(item.id)}"><input type="hidden" name="mode" value="frame"><button type="submit" aria-label="Launch as ${esc(u.name)} in the page">In the page</button></form>
      <form method="post" action="/as" class="inline"><input type="hidden" name="user" value="${esc(u.id)}"><input type="hidden" name="item" value="${esc(item.id)}"><input type="hidden" name="mode" value="window"><button class="quiet" type="submit" aria-label="Launch as ${esc(u.name)} in a new window" formtarget="_blank">New window</button></form></td></tr>`,
    )
    .join('');
  send(
    res,
    200,
    page(
      `Launch ${item.title}`,
      `<h1>${esc(item.title)}</h1><section><h2>Launch as…</h2><p class="note">The platform signs the chosen person in and starts Oscillab's login (LTI 1.3). “In the page” shows Oscillab in a frame as most platforms do; Oscillab then opens itself in its own window.</p><table><thead><tr><th>Person</th><th>Role</th><th></th></tr></thead><tbody>${rows}</tbody></table></section>`,
    ),
  );
});

/** "Sign in" to the stand-in as someone, then start Oscillab's OIDC login (third-party initiated). */
on('POST', /^\/as$/, async (req, res) => {
  const form = new URLSearchParams(await readBody(req));
  const user = state.users.find((u) => u.id === form.get('user'));
  if (!user) return send(res, 400, page('Unknown person', '<section><p>Unknown person.</p></section>'));
  const deepLink = form.get('deeplink') === '1';
  const item = deepLink ? null : state.items.find((i) => i.id === form.get('item'));
  if (!deepLink && !item) return send(res, 400, page('Unknown item', '<section><p>Unknown item.</p></section>'));
  const login = new URL(TOOL_LOGIN);
  login.searchParams.set('iss', BASE);
  login.searchParams.set('login_hint', user.id);
  login.searchParams.set('target_link_uri', TOOL_LAUNCH);
  login.searchParams.set('lti_message_hint', deepLink ? 'deeplink' : `item:${item!.id}`);
  login.searchParams.set('client_id', CLIENT_ID);
  login.searchParams.set('lti_deployment_id', DEPLOYMENT_ID);
  const cookie = `fp_user=${encodeURIComponent(user.id)}; Path=/; HttpOnly; SameSite=Lax`;
  if (form.get('mode') === 'frame') {
    return send(
      res,
      200,
      page(
        item!.title,
        `<h1>${esc(item!.title)}</h1><p class="note">Signed in to the platform as ${esc(user.name)}.</p><iframe title="Oscillab" src="${esc(login.toString())}"></iframe>`,
      ),
      'text/html; charset=utf-8',
      { 'set-cookie': cookie },
    );
  }
  res.writeHead(303, { location: login.toString(), 'set-cookie': cookie, 'cache-control': 'no-store' });
  res.end();
});

/** The OIDC authorisation endpoint: answers Oscillab's login with a signed id_token posted to its launch URL. */
async function authorize(req: http.IncomingMessage, res: http.ServerResponse, params: URLSearchParams) {
  const fail = (msg: string) =>
    send(res, 400, page('Launch refused', `<section><h1>The platform refused this login</h1><p>${esc(msg)}</p></section>`));
  if (
    params.get('scope') !== 'openid' ||
    params.get('response_type') !== 'id_token' ||
    params.get('response_mode') !== 'form_post' ||
    params.get('prompt') !== 'none'
  )
    return fail('Wrong OIDC parameters.');
  if (params.get('client_id') !== CLIENT_ID) return fail('Unknown client id.');
  if (params.get('redirect_uri') !== TOOL_LAUNCH) return fail('The redirect URI is not the one registered for Oscillab.');
  const state_ = params.get('state');
  const nonce = params.get('nonce');
  if (!state_ || !nonce) return fail('State and nonce are required.');
  const userId = params.get('login_hint');
  if (!userId || cookies(req).fp_user !== userId) return fail('The person signed in to the platform is not the one this login is for.');
  const user = state.users.find((u) => u.id === userId)!;
  const hint = params.get('lti_message_hint') ?? '';
  const now = Math.floor(Date.now() / 1000);
  const base: JWTPayload = {
    iss: BASE,
    aud: CLIENT_ID,
    azp: CLIENT_ID,
    sub: user.id,
    iat: now,
    exp: now + 300,
    nonce,
    name: user.name,
    given_name: user.given_name,
    family_name: user.family_name,
    email: user.email,
    [LTI.version]: '1.3.0',
    [LTI.deploymentId]: DEPLOYMENT_ID,
    [LTI.targetLinkUri]: TOOL_LAUNCH,
    [LTI.roles]: user.roles,
    [LTI.context]: contextClaim(),
    [LTI.toolPlatform]: {
      guid: `${BASE}/`,
      name: 'Northmere learning platform (local stand-in)',
      product_family_code: 'oscillab-fake-platform',
    },
  };
  let claims: JWTPayload;
  if (hint === 'deeplink') {
    const data = crypto.randomBytes(8).toString('hex');
    state.deepLinkData.push(data);
    claims = {
      ...base,
      [LTI.messageType]: 'LtiDeepLinkingRequest',
      [LTI.dlSettings]: {
        deep_link_return_url: `${BASE}/deep-link/return`,
        accept_types: ['ltiResourceLink'],
        accept_presentation_document_targets: ['iframe', 'window'],
        accept_multiple: false,
        auto_create: true,
        data,
      },
      ...servicesClaims(),
    };
  } else {
    const item = state.items.find((i) => `item:${i.id}` === hint);
    if (!item) return fail('Unknown item.');
    claims = {
      ...base,
      [LTI.messageType]: 'LtiResourceLinkRequest',
      [LTI.resourceLink]: { id: item.id, title: item.title },
      [LTI.custom]: item.custom,
      [LTI.presentation]: { document_target: 'iframe', return_url: `${BASE}/` },
      ...servicesClaims(item),
    };
  }
  save();
  send(res, 200, autoPost(params.get('redirect_uri')!, { id_token: await sign(claims), state: state_ }, 'Signing in to Oscillab…'));
}
on('GET', /^\/auth$/, async (req, res, url) => authorize(req, res, url.searchParams));
on('POST', /^\/auth$/, async (req, res) => authorize(req, res, new URLSearchParams(await readBody(req))));

on('GET', /^\/jwks$/, async (_req, res) => {
  if (state.down.jwks) return send(res, 503, 'key set unavailable', 'text/plain');
  sendJson(res, 200, { keys: state.keys.map((k) => k.publicJwk) });
});

/** Token endpoint: client credentials, authenticated by Oscillab's signed assertion (private_key_jwt). */
on('POST', /^\/token$/, async (req, res) => {
  if (state.down.token) return sendJson(res, 503, { error: 'temporarily_unavailable' });
  const form = new URLSearchParams(await readBody(req));
  if (
    form.get('grant_type') !== 'client_credentials' ||
    form.get('client_assertion_type') !== 'urn:ietf:params:oauth:client-assertion-type:jwt-bearer'
  ) {
    return sendJson(res, 400, { error: 'unsupported_grant_type' });
  }
  let payload: JWTPayload;
  try {
    ({ payload } = await verifyFromTool(form.get('client_assertion') ?? '', `${BASE}/token`));
  } catch (error) {
    return sendJson(res, 401, { error: 'invalid_client', error_description: (error as Error).message });
  }
  if (payload.sub !== CLIENT_ID || !payload.jti || usedJti.has(payload.jti))
    return sendJson(res, 401, { error: 'invalid_client', error_description: 'sub or jti' });
  usedJti.add(payload.jti);
  const allowed = Object.values(SCOPES);
  const scopes = (form.get('scope') ?? '').split(' ').filter((s) => allowed.includes(s));
  if (!scopes.length) return sendJson(res, 400, { error: 'invalid_scope' });
  const token = crypto.randomBytes(24).toString('base64url');
  tokens.set(token, { scopes, expiresAt: Date.now() + 3600_000 });
  sendJson(res, 200, { access_token: token, token_type: 'Bearer', expires_in: 3600, scope: scopes.join(' ') });
});

/** Names and Role Provisioning Services: the course's members. */
on('GET', /^\/api\/courses\/([^/]+)\/memberships$/, async (req, res, url) => {
  if (state.down.roster) return send(res, 503, 'roster unavailable', 'text/plain');
  if (!bearer(req, SCOPES.roster)) return sendJson(res, 401, { error: 'invalid_token' });
  if (decodeURIComponent(url.pathname.split('/')[3]) !== state.course.id) return sendJson(res, 404, { error: 'no such course' });
  const members = state.users.map((u) => ({
    user_id: u.id,
    roles: u.roles,
    status: u.status,
    name: u.name,
    given_name: u.given_name,
    family_name: u.family_name,
    email: u.email,
  }));
  sendJson(res, 200, { id: url.toString(), context: contextClaim(), members }, 'application/vnd.ims.lti-nrps.v2.membershipcontainer+json');
});

/** Assignment and Grade Services: line items of the course. */
on('GET', /^\/api\/courses\/([^/]+)\/lineitems$/, async (req, res, url) => {
  if (state.down.ags) return send(res, 503, 'grade service unavailable', 'text/plain');
  if (!bearer(req, SCOPES.lineItem)) return sendJson(res, 401, { error: 'invalid_token' });
  const q = url.searchParams;
  const list = state.lineItems.filter(
    (l) =>
      (!q.get('resource_id') || l.resourceId === q.get('resource_id')) &&
      (!q.get('resource_link_id') || l.resourceLinkId === q.get('resource_link_id')) &&
      (!q.get('tag') || l.tag === q.get('tag')),
  );
  sendJson(res, 200, list, 'application/vnd.ims.lis.v2.lineitemcontainer+json');
});
on('POST', /^\/api\/courses\/([^/]+)\/lineitems$/, async (req, res) => {
  if (state.down.ags) return send(res, 503, 'grade service unavailable', 'text/plain');
  if (!bearer(req, SCOPES.lineItem)) return sendJson(res, 401, { error: 'invalid_token' });
  const body = JSON.parse(await readBody(req)) as Partial<LineItem>;
  if (typeof body.scoreMaximum !== 'number' || body.scoreMaximum <= 0 || typeof body.label !== 'string')
    return sendJson(res, 400, { error: 'scoreMaximum and label are required' });
  const li: LineItem = {
    id: `${BASE}/api/lineitems/${crypto.randomBytes(4).toString('hex')}`,
    label: body.label,
    scoreMaximum: body.scoreMaximum,
    resourceId: body.resourceId,
    tag: body.tag,
    resourceLinkId: body.resourceLinkId,
  };
  state.lineItems.push(li);
  save();
  sendJson(res, 201, li, 'application/vnd.ims.lis.v2.lineitem+json');
});
on('GET', /^\/api\/lineitems\/([^/]+)$/, async (req, res, url) => {
  if (!bearer(req, SCOPES.lineItem)) return sendJson(res, 401, { error: 'invalid_token' });
  const li = state.lineItems.find((l) => l.id === `${BASE}${url.pathname}`);
  if (!li) return sendJson(res, 404, { error: 'no such line item' });
  sendJson(res, 200, li, 'application/vnd.ims.lis.v2.lineitem+json');
});

/** Scores: the result is replaced only by a score with a later timestamp (AGS 2.0), so a repeat counts once. */
on('POST', /^\/api\/lineitems\/([^/]+)\/scores$/, async (req, res, url) => {
  if (state.down.ags) return send(res, 503, 'grade service unavailable', 'text/plain');
  if (!bearer(req, SCOPES.score)) return sendJson(res, 401, { error: 'invalid_token' });
  if (!(req.headers['content-type'] ?? '').startsWith('application/vnd.ims.lis.v1.score+json'))
    return sendJson(res, 415, { error: 'score media type expected' });
  const li = state.lineItems.find((l) => `${l.id}/scores` === `${BASE}${url.pathname}`);
  if (!li) return sendJson(res, 404, { error: 'no such line item' });
  const s = JSON.parse(await readBody(req)) as Partial<Result> & { userId?: string };
  if (!s.userId || typeof s.timestamp !== 'string' || !s.activityProgress || !s.gradingProgress)
    return sendJson(res, 400, { error: 'userId, timestamp, activityProgress and gradingProgress are required' });
  if (!state.users.some((u) => u.id === s.userId)) return sendJson(res, 400, { error: 'unknown user' });
  const current = state.results.find((r) => r.lineItemId === li.id && r.userId === s.userId);
  const newer = !current || new Date(s.timestamp).getTime() > new Date(current.timestamp).getTime();
  state.deliveries.push({
    lineItemId: li.id,
    userId: s.userId,
    scoreGiven: Number(s.scoreGiven),
    timestamp: s.timestamp,
    receivedAt: new Date().toISOString(),
    applied: newer,
  });
  if (newer) {
    const result: Result = {
      lineItemId: li.id,
      userId: s.userId,
      scoreGiven: Number(s.scoreGiven),
      scoreMaximum: Number(s.scoreMaximum),
      comment: s.comment,
      timestamp: s.timestamp,
      activityProgress: s.activityProgress,
      gradingProgress: s.gradingProgress,
      updatedAt: new Date().toISOString(),
    };
    state.results = state.results.filter((r) => r !== current).concat(result);
  }
  save();
  res.writeHead(204);
  res.end();
});

on('GET', /^\/gradebook$/, async (_req, res) => {
  const learners = state.users.filter((u) => u.roles.some((r) => r.endsWith('#Learner')));
  const head = state.lineItems.map((l) => `<th>${esc(l.label)}<br><span class="note">out of ${esc(l.scoreMaximum)}</span></th>`).join('');
  const rows = learners
    .map(
      (u) =>
        `<tr><td>${esc(u.name)}</td>${state.lineItems
          .map((l) => {
            const r = state.results.find((x) => x.lineItemId === l.id && x.userId === u.id);
            if (!r) return '<td>—</td>';
            const link = /https?:\/\/\S+/.exec(r.comment ?? '')?.[0];
            return `<td data-score="${esc(r.scoreGiven)}"><strong>${esc(r.scoreGiven)}</strong> / ${esc(r.scoreMaximum)}<br><span class="note">${esc(r.gradingProgress)} · ${esc(new Date(r.timestamp).toLocaleString('en-GB'))}${link ? ` · <a href="${esc(link)}">feedback</a>` : ''}</span></td>`;
          })
          .join('')}</tr>`,
    )
    .join('');
  send(
    res,
    200,
    page(
      'Gradebook',
      `<h1>Gradebook</h1><section>${state.lineItems.length ? `<table><thead><tr><th>Student</th>${head}</tr></thead><tbody>${rows}</tbody></table>` : '<p>No graded items yet.</p>'}<p class="note">${state.deliveries.length} score message(s) received in all.</p></section>`,
    ),
  );
});

/** Deep Linking 2.0 return: Oscillab's signed response places the item (and its line item). */
on('POST', /^\/deep-link\/return$/, async (req, res) => {
  const form = new URLSearchParams(await readBody(req));
  let payload: JWTPayload;
  try {
    ({ payload } = await verifyFromTool(form.get('JWT') ?? '', BASE));
  } catch (error) {
    return send(
      res,
      400,
      page('Refused', `<section><h1>The platform refused Oscillab's answer</h1><p>${esc((error as Error).message)}</p></section>`),
    );
  }
  if (
    payload[LTI.messageType] !== 'LtiDeepLinkingResponse' ||
    payload[LTI.version] !== '1.3.0' ||
    payload[LTI.deploymentId] !== DEPLOYMENT_ID
  ) {
    return send(res, 400, page('Refused', '<section><p>Not a deep-linking response for this deployment.</p></section>'));
  }
  const data = payload[LTI.dlData];
  if (typeof data !== 'string' || !state.deepLinkData.includes(data))
    return send(res, 400, page('Refused', '<section><p>The response does not answer a request of this platform.</p></section>'));
  state.deepLinkData = state.deepLinkData.filter((d) => d !== data);
  const items = Array.isArray(payload[LTI.dlItems]) ? (payload[LTI.dlItems] as Record<string, unknown>[]) : [];
  const placed = items
    .filter((i) => i.type === 'ltiResourceLink')
    .map((i) => placeItem(String(i.title ?? 'Oscillab item'), (i.custom ?? {}) as Record<string, string>, i.lineItem as never));
  save();
  send(
    res,
    200,
    page(
      'Placed',
      `<h1>Item placed</h1><section><p>${placed.map((p) => esc(p.title)).join(', ') || 'Nothing'} ${placed.length === 1 ? 'was' : 'were'} added to the course.</p><p class="note">${esc(payload[LTI.dlMsg] ?? '')}</p><p><a class="button" href="/">Back to the course</a></p></section>`,
    ),
  );
});

// ——— Controls for tests and the demo (this stand-in only) ———————————————————————————

const controlValue = async (req: http.IncomingMessage) => {
  const text = await readBody(req);
  return (req.headers['content-type'] ?? '').includes('json')
    ? (JSON.parse(text || '{}') as Record<string, unknown>)
    : Object.fromEntries(new URLSearchParams(text));
};
const controlDone = (req: http.IncomingMessage, res: http.ServerResponse, body: unknown) => {
  if ((req.headers.accept ?? '').includes('text/html')) {
    res.writeHead(303, { location: '/' });
    return res.end();
  }
  sendJson(res, 200, body);
};
on('GET', /^\/control\/state$/, async (_req, res) =>
  sendJson(res, 200, { ...state, keys: state.keys.map((k) => ({ kid: k.kid, active: k.active })) }),
);
on('POST', /^\/control\/rotate-key$/, async (req, res) => {
  const v = await controlValue(req);
  for (const k of state.keys) k.active = false;
  const fresh = await newKey();
  if (v.drop === true || v.drop === '1') state.keys = [];
  state.keys.push(fresh);
  save();
  controlDone(req, res, { kid: fresh.kid });
});
for (const service of ['ags', 'jwks', 'token', 'roster'] as const) {
  on('POST', new RegExp(`^/control/${service}$`), async (req, res) => {
    const v = await controlValue(req);
    state.down[service] = v.down === true || v.down === '1';
    save();
    controlDone(req, res, { [service]: state.down[service] ? 'down' : 'up' });
  });
}
/** Sign any claims with the platform's active key (tests build their bad tokens with it). */
on('POST', /^\/control\/sign$/, async (req, res) => {
  const v = (await controlValue(req)) as { payload?: JWTPayload; header?: Record<string, unknown> };
  sendJson(res, 200, { jwt: await sign(v.payload ?? {}, v.header ?? {}) });
});
on('POST', /^\/control\/users$/, async (req, res) => {
  const v = (await controlValue(req)) as { set?: Partial<User> & { id: string } };
  if (v.set) {
    const u = state.users.find((x) => x.id === v.set!.id);
    if (u) Object.assign(u, v.set);
    else
      state.users.push(
        person(v.set.id, v.set.given_name ?? '', v.set.family_name ?? '', v.set.email ?? '', v.set.roles ?? [], v.set.status),
      );
  }
  save();
  sendJson(res, 200, { users: state.users.length });
});
on('POST', /^\/control\/items$/, async (req, res) => {
  const v = (await controlValue(req)) as { title?: string; custom?: Record<string, string>; lineItem?: { scoreMaximum: number } };
  const item = placeItem(v.title ?? 'Item', v.custom ?? {}, v.lineItem);
  save();
  sendJson(res, 201, item);
});

const server = http.createServer(async (req, res) => {
  const url = new URL(req.url ?? '/', BASE);
  const route = routes.find(([m, p]) => m === req.method && p.test(url.pathname));
  try {
    if (!route) return send(res, 404, page('Not found', '<section><p>Not found.</p></section>'));
    await route[2](req, res, url);
  } catch (error) {
    console.error('[fake-platform]', error);
    if (!res.headersSent) send(res, 500, page('Error', `<section><p>${esc((error as Error).message)}</p></section>`));
  }
});

init().then(() => {
  server.listen(PORT, '127.0.0.1', () => console.log(`[fake-platform] ${BASE} (Oscillab at ${TOOL})`));
});
for (const signal of ['SIGINT', 'SIGTERM'] as const) process.on(signal, () => server.close(() => process.exit(0)));
