/**
 * Bad input (issue 8, item 2): every JSON API, found from the code, is fed generated garbage as
 * the most privileged caller it allows (so validation, not authorisation, answers): wrong types
 * for every field, missing fields, 1 MB strings, deep nesting, NaN/Infinity, unicode edge cases,
 * SQL and HTML injection, arrays for objects, non-JSON bodies and wrong content types. Every
 * answer must be a 4xx with a JSON `error` sentence, never a 500, and the database must be
 * byte-for-byte unchanged afterwards (a hash of every table, nothing excluded: sign_in_failures
 * and the outbox included, since refused input must not count or queue anything either).
 * The multipart upload route gets a few garbage bodies too, and the upload directory must not change.
 * Issue 14 added the JCAMP-DX DUP bomb to the uploads and a formula nested 3,000 deep to the
 * practical instructions, each of which once answered 500 or took the server down.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params, sessionCookie } from '../helpers/session';
import { dirListing, routeHandlers, tableChecksums, type RouteHandler } from '../helpers/routes';
import { buildFixtureWorld, correctValues, freshSubmission, type FixtureWorld } from '../helpers/fixture-world';
import { draftFor } from '@/tests/fixtures/submissions/practical';
import { models } from '@/models';
import { connectContext, createRegistration } from '@/lib/lti/admin';

type Role = 'anonymous' | 'student' | 'admin';
type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
type Path = (string | number)[];

interface Entry {
  /** The most privileged caller the route allows (students only for their own drafts; anonymous for public routes). */
  as: Role;
  call: (w: FixtureWorld) => { url: string; params?: Record<string, string> };
  /** A valid body: the garbage is generated from it, one defect at a time. */
  body: (w: FixtureWorld) => { [k: string]: Json };
  /** Top-level fields that may be left out (leaving them out would be a valid, writing request). */
  optional?: string[];
  /** Free-text fields (dotted paths): any string within the length limit is valid there. */
  text?: string[];
  /**
   * Defects that make the body invalid on their own, one per field. Injection strings in a free-
   * text field are valid input, so they are sent together with a defect in another field: the
   * point is that they neither crash the parser nor get written.
   */
  breakers?: Record<string, Json>;
  /**
   * Fields rendered as Markdown with formulas: a formula nested 3,000 braces deep there is refused
   * on its own (issue 14, item 7), so it is sent alone, without a breaker.
   */
  formula?: string[];
}

const SQLI = "'; DROP TABLE users; --";
const INJECTIONS: [string, string][] = [
  ['sql injection', SQLI],
  ['sql tautology', "1' OR '1'='1"],
  ['html/script', '<script>alert(document.cookie)</script><img src=x onerror=alert(1)>'],
  ['rtl override', '\u202Egnp.exe\u202C \u200F'],
  ['zero-width joiners', 'a\u200D\u200Db\u200B\uFEFF'],
  ['emoji', '🧪👩‍🔬🏳️‍🌈'],
  ['NUL', 'a\u0000b'],
  ['CR/LF', 'a\r\nBcc: someone@example.org'],
];
/** Issue 14, item 7: a formula with 3,000 nested braces answered 500 on every page that showed it. */
const NESTED_FORMULA = `Record the band: $${'{'.repeat(3000)}x${'}'.repeat(3000)}$.`;
/**
 * Issue 14, item 1: 188 bytes of JCAMP-DX whose DUP compression stands for 200 million points
 * ("A0T00000000"); it took the whole server down before the points were counted first.
 */
const JCAMP_DUP_BOMB =
  '##TITLE=bomb\n##JCAMP-DX=4.24\n##DATA TYPE=INFRARED SPECTRUM\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XFACTOR=1\n##YFACTOR=1\n##FIRSTX=4000\n##LASTX=400\n##XYDATA=(X++(Y..Y))\n4000 A0T00000000\n##END=\n';
/** Raw JSON string literals that JSON.stringify would not produce: lone surrogates. */
const RAW_STRINGS: [string, string][] = [
  ['lone high surrogate', '"\\ud800"'],
  ['lone low surrogate', '"x\\udfffy"'],
];
const RAW_NUMBERS = ['NaN', 'Infinity', '-Infinity', '1e309', '-1e309'];
const BIG = 'x'.repeat(500_000);
const MB = 'x'.repeat(1_048_576);

const at = (obj: Json, path: Path): Json => path.reduce<Json>((o, k) => (o as Record<string, Json>)[k as string], obj);
function setAt(obj: Json, path: Path, value: Json | undefined): Json {
  const copy = structuredClone(obj);
  let o = copy as Record<string, Json>;
  for (const k of path.slice(0, -1)) o = o[k as string] as Record<string, Json>;
  const last = path[path.length - 1] as string;
  if (value === undefined) delete o[last];
  else o[last] = value;
  return copy;
}
/** Every path in the valid body: objects all the way down, arrays through their first element. */
function paths(value: Json, prefix: Path = []): Path[] {
  const out: Path[] = prefix.length ? [prefix] : [];
  if (Array.isArray(value)) {
    if (value.length) out.push(...paths(value[0], [...prefix, 0]));
  } else if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) out.push(...paths(v, [...prefix, k]));
  }
  return out;
}

type Variant = { name: string; body?: Json; raw?: string | Uint8Array; type?: string | null };

function variants(e: Entry, valid: { [k: string]: Json }): Variant[] {
  const out: Variant[] = [];
  const text = new Set(e.text ?? []);
  const breakFor = (path: Path): Record<string, Json> | null => {
    const pair = Object.entries(e.breakers ?? {}).find(([k]) => k !== path[0]);
    return pair ? { [pair[0]]: pair[1] } : null;
  };
  const raw = (name: string, body: Json, path: Path, literal: string) => {
    const marker = '__RAW_MARKER__';
    out.push({ name, raw: JSON.stringify(setAt(body, path, marker)).replace(`"${marker}"`, literal) });
  };

  // The whole body.
  out.push(
    { name: 'not JSON', raw: 'this is not JSON' },
    { name: 'truncated JSON', raw: JSON.stringify(valid).slice(0, -3) },
    { name: 'empty body', raw: '' },
    { name: 'bare NaN', raw: 'NaN' },
    { name: 'invalid UTF-8 bytes', raw: new Uint8Array([0xff, 0xfe, 0x00, 0x7b, 0xc3, 0x28]) },
    { name: 'array instead of object', body: [valid] },
    { name: 'empty array', body: [] },
    { name: 'string', body: 'just a string' },
    { name: 'number', body: 42 },
    { name: 'null', body: null },
    { name: 'true', body: true },
    { name: '1 MB extra field', body: { ...valid, padding: MB } },
    { name: '1 MB array of numbers', raw: `[${'1,'.repeat(550_000)}1]` },
    { name: 'text/plain', body: valid, type: 'text/plain' },
    {
      name: 'form-encoded',
      raw: new URLSearchParams(Object.entries(valid).map(([k, v]) => [k, String(v)])).toString(),
      type: 'application/x-www-form-urlencoded',
    },
    { name: 'multipart type with JSON', body: valid, type: 'multipart/form-data; boundary=x' },
    { name: 'no content type', body: valid, type: null },
  );
  if (Object.keys(valid).some((k) => !(e.optional ?? []).includes(k))) out.push({ name: 'empty object', body: {} });
  let deep: Json = valid;
  for (let i = 0; i < 60; i++) deep = { nest: deep };
  out.push({ name: 'nested 60 deep', body: deep }, { name: 'deep extra field', body: { ...valid, extra: deep } });
  out.push({ name: 'nested 100 000 deep (raw)', raw: `${'['.repeat(100_000)}${']'.repeat(100_000)}` });

  // Missing required fields.
  for (const k of Object.keys(valid))
    if (!(e.optional ?? []).includes(k)) out.push({ name: `missing ${k}`, body: setAt(valid, [k], undefined) });

  // One field at a time.
  for (const path of paths(valid)) {
    const name = path.join('.');
    const v = at(valid, path);
    const put = (label: string, value: Json) => out.push({ name: `${name} = ${label}`, body: setAt(valid, path, value) });
    if (typeof v === 'number') {
      for (const g of ['42', 'NaN', 'Infinity', SQLI] as Json[]) put(JSON.stringify(g), g);
      put('true', true);
      put('[]', []);
      put('{}', {});
      put('{$gt: 0}', { $gt: 0 });
      for (const lit of RAW_NUMBERS) raw(`${name} = ${lit} (raw)`, valid, path, lit);
    } else if (typeof v === 'boolean') {
      for (const g of ['true', 1, 0, 'yes', SQLI] as Json[]) put(JSON.stringify(g), g);
      put('[]', []);
    } else if (typeof v === 'string') {
      put('12345', 12345);
      put('true', true);
      put('[]', []);
      put('{}', {});
      put('[string]', [v]);
      put('500 000 characters', BIG);
      if (text.has(name)) {
        const breaker = breakFor(path);
        if (breaker) {
          for (const [label, s] of INJECTIONS)
            out.push({
              name: `${name} = ${label} (+ ${Object.keys(breaker)[0]} broken)`,
              body: { ...(setAt(valid, path, s) as object), ...breaker },
            });
          for (const [label, lit] of RAW_STRINGS)
            raw(`${name} = ${label} (+ ${Object.keys(breaker)[0]} broken)`, { ...valid, ...breaker }, path, lit);
        }
      } else {
        for (const [label, s] of INJECTIONS) put(label, s);
        for (const [label, lit] of RAW_STRINGS) raw(`${name} = ${label}`, valid, path, lit);
      }
      if ((e.formula ?? []).includes(name)) put('formula nested 3,000 braces deep', NESTED_FORMULA);
    } else if (v === null) {
      put('true', true);
      put('[]', []);
      put('{}', {});
    } else if (Array.isArray(v)) {
      put('object', { 0: v[0] ?? 1 });
      put('string', 'a,b');
      put('number', 1);
      if (!v.length) {
        put('[null]', [null]);
        put('[sql]', [SQLI]);
        put('[{}]', [{}]);
      }
    } else if (typeof v === 'object') {
      put('string', '[object Object]');
      put('number', 1);
      put('true', true);
      if (!Object.keys(v).length) put('{"1": "not an id"}', { 1: 'not an id' });
      else put('[]', []);
    }
  }
  return out;
}

const version = async (id: number) => (await models().Submission.findByPk(id))!.version;
let extra: {
  outboxId: number;
  marked: { id: number; version: number };
  open: { id: number; version: number };
  lti: { registrationId: number; contextId: number };
};

const practicalBody = (w: FixtureWorld): { [k: string]: Json } => ({
  title: 'Bad input practical',
  species: ['H35Cl'],
  instructions: 'Record the band.',
  hazardNotes: 'HCl gas is corrosive.',
  mode: 'practice',
  maxAttempts: 3,
  lateRule: 'penalty',
  latePenaltyPerDay: 10,
  latePenaltyCap: 50,
  rubric: [{ key: 'discussion', title: 'Discussion of errors', marks: 2, guidance: 'Name the main errors.' }],
  deadlines: [{ cohortId: w.cohort.id, deadline: '2027-01-15T17:00:00Z' }],
});
const PRACTICAL_TEXT = ['title', 'instructions', 'hazardNotes', 'rubric.0.title', 'rubric.0.guidance'];
const draftText = [
  'lineText',
  'bandCentre.value',
  'bandCentre.unit',
  'bandCentre.uncertainty',
  ...['bandCentre', 'reducedMass', 'forceConstant'].flatMap((k) => ['value', 'unit', 'uncertainty'].map((f) => `values.${k}.${f}`)),
].map((p) => `draft.species.H35Cl.${p}`);

const LTI_REGISTRATION = {
  name: 'Bad input platform',
  issuer: 'https://bad-input-new.example',
  clientId: 'bad-input-client',
  deploymentIds: ['bad-input-deployment'],
  authLoginUrl: 'https://bad-input-new.example/auth',
  authTokenUrl: 'https://bad-input-new.example/token',
  keySetUrl: 'https://bad-input-new.example/jwks',
  tokenAudience: 'https://bad-input-new.example/token',
};

const BAD: Record<string, Entry> = {
  'POST /api/lti/registrations': {
    as: 'admin',
    call: () => ({ url: '/api/lti/registrations' }),
    body: () => LTI_REGISTRATION,
    optional: ['tokenAudience'],
    text: ['name', 'clientId', 'deploymentIds.0'],
    breakers: { issuer: 'not an address', keySetUrl: 5 },
  },
  'PATCH /api/lti/registrations/[registrationId]': {
    as: 'admin',
    call: () => ({
      url: `/api/lti/registrations/${extra.lti.registrationId}`,
      params: { registrationId: String(extra.lti.registrationId) },
    }),
    body: () => ({ ...LTI_REGISTRATION, issuer: 'https://bad-input-platform.example', active: true }),
    optional: Object.keys({ ...LTI_REGISTRATION, active: true }),
    text: ['name', 'clientId', 'deploymentIds.0'],
    breakers: { issuer: 'not an address', active: 'yes' },
  },
  'POST /api/lti/contexts': {
    as: 'admin',
    call: () => ({ url: '/api/lti/contexts' }),
    body: (w) => ({
      registrationId: extra.lti.registrationId,
      contextId: 'bad-input-new-context',
      courseId: w.course.id,
      defaultCohortId: w.cohort.id,
    }),
    optional: ['defaultCohortId'],
    text: ['contextId'],
    breakers: { registrationId: 'first', courseId: 'this one' },
  },
  'PATCH /api/lti/contexts/[contextId]': {
    as: 'admin',
    call: () => ({ url: `/api/lti/contexts/${extra.lti.contextId}`, params: { contextId: String(extra.lti.contextId) } }),
    body: (w) => ({ defaultCohortId: w.otherCohort.id }),
  },
  'POST /api/lti/contexts/[contextId]/roster': {
    as: 'admin',
    call: () => ({ url: `/api/lti/contexts/${extra.lti.contextId}/roster`, params: { contextId: String(extra.lti.contextId) } }),
    body: () => ({ fingerprint: '0123456789abcdef0123456789abcdef' }),
  },
  'POST /api/admin/memberships': {
    as: 'admin',
    call: () => ({ url: '/api/admin/memberships' }),
    body: (w) => ({ email: w.people.nobody.email, courseId: w.course.id, role: 'ta', cohortId: null }),
    optional: ['cohortId'],
  },
  'POST /api/courses': {
    as: 'admin',
    call: () => ({ url: '/api/courses' }),
    body: () => ({ code: 'BAD-INPUT-1', title: 'Bad input course' }),
    text: ['title'],
    breakers: { code: 'no spaces allowed', title: 5 },
  },
  'PATCH /api/courses/[courseId]': {
    as: 'admin',
    call: (w) => ({ url: `/api/courses/${w.course.id}`, params: { courseId: String(w.course.id) } }),
    body: () => ({ title: 'Renamed course', archived: false }),
    optional: ['title', 'archived'],
    text: ['title'],
    breakers: { archived: 'no' },
  },
  'POST /api/courses/[courseId]/cohorts': {
    as: 'admin',
    call: (w) => ({ url: `/api/courses/${w.course.id}/cohorts`, params: { courseId: String(w.course.id) } }),
    body: () => ({ name: 'Bad input cohort', term: '2027 Spring', instrument: 'Bench 9' }),
    optional: ['instrument'],
    text: ['name', 'term', 'instrument'],
    breakers: { name: 5, term: 5 },
  },
  'PATCH /api/courses/[courseId]/cohorts/[cohortId]': {
    as: 'admin',
    call: (w) => ({
      url: `/api/courses/${w.course.id}/cohorts/${w.cohort.id}`,
      params: { courseId: String(w.course.id), cohortId: String(w.cohort.id) },
    }),
    body: () => ({ name: 'Renamed cohort', term: '2027 Spring', instrument: 'Bench 9', archived: false }),
    optional: ['name', 'term', 'instrument', 'archived'],
    text: ['name', 'term', 'instrument'],
    breakers: { archived: 'no' },
  },
  'POST /api/courses/[courseId]/practicals': {
    as: 'admin',
    call: (w) => ({ url: `/api/courses/${w.course.id}/practicals`, params: { courseId: String(w.course.id) } }),
    body: practicalBody,
    optional: ['instructions', 'hazardNotes', 'rubric', 'deadlines'],
    text: PRACTICAL_TEXT,
    breakers: { mode: 'sometimes', maxAttempts: 'three' },
    formula: ['instructions'],
  },
  'POST /api/courses/[courseId]/staff': {
    as: 'admin',
    call: (w) => ({ url: `/api/courses/${w.course.id}/staff`, params: { courseId: String(w.course.id) } }),
    body: () => ({ email: 'new.staff@test.example', role: 'ta', name: 'New Staff' }),
    optional: ['name'],
    text: ['name'],
    breakers: { role: 'god' },
  },
  'POST /api/courses/[courseId]/ta-assignments': {
    as: 'admin',
    call: (w) => ({ url: `/api/courses/${w.course.id}/ta-assignments`, params: { courseId: String(w.course.id) } }),
    body: (w) => ({ taId: w.people.otherTa.id, cohortId: w.cohort.id, studentIds: [w.people.student.id] }),
    optional: ['studentIds'],
  },
  'POST /api/invitations/accept': {
    as: 'anonymous',
    call: () => ({ url: '/api/invitations/accept' }),
    body: () => ({ token: 'bad-input-unknown-token-0123456789', password: 'correct-horse-battery-7', confirm: 'correct-horse-battery-7' }),
    text: ['password', 'confirm'],
    breakers: { token: 5 },
  },
  'POST /api/password-reset': {
    as: 'anonymous',
    call: () => ({ url: '/api/password-reset' }),
    body: (w) => ({ email: w.people.student.email }),
  },
  'PUT /api/marking/[submissionId]': {
    as: 'admin',
    call: (w) => ({ url: `/api/marking/${w.submission.id}`, params: { submissionId: String(w.submission.id) } }),
    body: (w) => ({
      version: w.submission.version,
      items: [{ itemKey: 'rubric:discussion', awarded: 1, comment: 'Good discussion.' }],
      markerComment: 'Well done.',
    }),
    optional: ['markerComment'],
    text: ['items.0.comment', 'markerComment'],
    breakers: { version: 'one', items: 'none' },
  },
  'POST /api/marking/[submissionId]/accept': {
    as: 'admin',
    call: (w) => ({ url: `/api/marking/${w.submission.id}/accept`, params: { submissionId: String(w.submission.id) } }),
    body: (w) => ({ version: w.submission.version }),
  },
  'POST /api/marking/[submissionId]/resend': {
    as: 'admin',
    call: (w) => ({ url: `/api/marking/${w.submission.id}/resend`, params: { submissionId: String(w.submission.id) } }),
    body: () => ({ outboxId: extra.outboxId }),
  },
  'POST /api/marking/[submissionId]/resubmission': {
    as: 'admin',
    call: () => ({ url: `/api/marking/${extra.open.id}/resubmission`, params: { submissionId: String(extra.open.id) } }),
    body: () => ({ message: 'Please redo the band centre.', version: extra.open.version }),
    optional: ['version'],
    text: ['message'],
    breakers: { version: 'latest' },
  },
  'POST /api/moderation/[submissionId]': {
    as: 'admin',
    call: () => ({ url: `/api/moderation/${extra.marked.id}`, params: { submissionId: String(extra.marked.id) } }),
    body: () => ({
      decision: 'changed',
      version: extra.marked.version,
      items: [{ itemKey: 'rubric:discussion', awarded: 2 }],
      note: 'Discussion deserved full marks.',
    }),
    optional: ['items'],
    text: ['note'],
    breakers: { decision: 'maybe' },
  },
  'POST /api/release': {
    as: 'admin',
    call: () => ({ url: '/api/release' }),
    body: () => ({ submissionIds: [extra.marked.id] }),
  },
  'POST /api/practicals/markdown': {
    // The only field is free text, and the route writes nothing: injection strings there are
    // valid input (their rendering is checked by the markdown unit tests), so only defects here.
    as: 'admin',
    call: () => ({ url: '/api/practicals/markdown' }),
    body: () => ({ markdown: '# Band\n\nRecord the *fundamental*.' }),
    text: ['markdown'],
  },
  'PUT /api/practicals/[practicalId]': {
    as: 'admin',
    call: (w) => ({ url: `/api/practicals/${w.setup.id}`, params: { practicalId: String(w.setup.id) } }),
    body: practicalBody,
    optional: ['instructions', 'hazardNotes', 'rubric', 'deadlines'],
    text: PRACTICAL_TEXT,
    breakers: { mode: 'sometimes', maxAttempts: 'three' },
    formula: ['instructions'],
  },
  'PUT /api/practicals/[practicalId]/bands': {
    as: 'admin',
    call: (w) => ({ url: `/api/practicals/${w.practical.id}/bands`, params: { practicalId: String(w.practical.id) } }),
    body: (w) => ({
      quantityDefinitionId: w.defs['bandCentre:H35Cl'].id,
      cohortId: null,
      basis: 'accuracy',
      kind: 'absolute',
      inner: 1,
      outer: 4,
      unit: 'cm-1',
      recheck: false,
    }),
    optional: ['outer'],
    text: ['unit'],
    breakers: { basis: 'both' },
  },
  'PUT /api/practicals/[practicalId]/spectrum-settings': {
    as: 'admin',
    call: (w) => ({ url: `/api/practicals/${w.setup.id}/spectrum-settings`, params: { practicalId: String(w.setup.id) } }),
    body: () => ({ spectrumAnalysis: true, samples: [{ key: 'cell', label: 'HCl cell', molecules: ['HCl'], bands: ['fundamental'] }] }),
    text: ['samples.0.label'],
    breakers: { spectrumAnalysis: 'yes' },
  },
  'DELETE /api/practicals/[practicalId]/bands': {
    as: 'admin',
    call: (w) => ({ url: `/api/practicals/${w.setup.id}/bands`, params: { practicalId: String(w.setup.id) } }),
    body: (w) => ({ bandId: w.setupBand.id, recheck: false }),
    optional: ['recheck'],
  },
  'POST /api/practicals/[practicalId]/copy': {
    as: 'admin',
    call: (w) => ({ url: `/api/practicals/${w.setup.id}/copy`, params: { practicalId: String(w.setup.id) } }),
    body: (w) => ({ title: 'Bad input copy', cohortMap: {}, deadlines: [{ cohortId: w.cohort.id, deadline: '2027-02-01T17:00:00Z' }] }),
    optional: ['cohortMap', 'deadlines'],
    text: ['title'],
    breakers: { deadlines: 'soon' },
  },
  'POST /api/practicals/[practicalId]/preview': {
    as: 'admin',
    call: (w) => ({ url: `/api/practicals/${w.practical.id}/preview`, params: { practicalId: String(w.practical.id) } }),
    body: (w) => ({
      quantityDefinitionId: w.defs['bandCentre:H35Cl'].id,
      cohortId: w.cohort.id,
      value: 2886.0,
      unit: 'cm-1',
      uncertainty: 0.5,
      recomputed: 2886.1,
    }),
    optional: ['uncertainty', 'recomputed'],
    text: ['unit'],
    breakers: { value: 'about 2886' },
  },
  'POST /api/practicals/[practicalId]/quantities': {
    as: 'admin',
    call: (w) => ({ url: `/api/practicals/${w.setup.id}/quantities`, params: { practicalId: String(w.setup.id) } }),
    body: () => ({
      key: 'B1',
      species: 'H35Cl',
      unit: 'cm-1',
      marks: 1,
      uncertaintyRequired: false,
      referenceKind: 'department',
      referenceValue: 10.1,
      referenceNote: 'Invented department value.',
      position: 5,
    }),
    optional: ['position'],
    text: ['referenceNote'],
    breakers: { key: 'notAQuantity' },
  },
  'PUT /api/practicals/[practicalId]/quantities/[quantityId]': {
    as: 'admin',
    call: (w) => ({
      url: `/api/practicals/${w.setup.id}/quantities/${w.setupQuantity.id}`,
      params: { practicalId: String(w.setup.id), quantityId: String(w.setupQuantity.id) },
    }),
    body: () => ({
      key: 'bandCentre',
      species: 'H35Cl',
      unit: 'cm-1',
      marks: 3,
      uncertaintyRequired: false,
      referenceKind: 'department',
      referenceValue: 2886.1,
      referenceNote: 'Invented department value.',
      position: 1,
    }),
    optional: ['position'],
    text: ['referenceNote'],
    breakers: { key: 'notAQuantity' },
  },
  'POST /api/submissions/[id]/submit': {
    as: 'student',
    call: (w) => ({ url: `/api/submissions/${w.draftB.id}/submit`, params: { id: String(w.draftB.id) } }),
    body: (w) => ({ version: extraDraftVersion, draft: w.draftB.draft as unknown as Json }),
    text: draftText,
    breakers: { version: 'latest' },
  },
  'POST /api/submissions/check': {
    as: 'student',
    call: () => ({ url: '/api/submissions/check' }),
    body: (w) => ({ practicalId: w.draftC.practicalId, draft: draftFor('H35Cl', correctValues()) as unknown as Json }),
    text: draftText,
    breakers: { practicalId: 'C' },
  },
  'PUT /api/submissions/draft': {
    as: 'student',
    call: () => ({ url: '/api/submissions/draft' }),
    body: (w) => ({ practicalId: w.draftC.practicalId, draft: draftFor('H35Cl', correctValues()) as unknown as Json }),
    text: draftText,
    breakers: { practicalId: 'C' },
  },
};
let extraDraftVersion = 0;

/** Methods that take a body but not JSON, or none at all, each with the reason. */
const NOT_JSON: Record<string, string> = {
  'DELETE /api/practicals/[practicalId]/quantities/[quantityId]': 'no body: the ids are in the URL',
};

let world: FixtureWorld;
let handlers: RouteHandler[];
let before: Record<string, string>;
let last: Record<string, string> | undefined;
let uploadsBefore: string[];
/** Session cookies made once (signing one per request would dominate the run time). */
const cookies: Partial<Record<Role, string>> = {};

beforeAll(async () => {
  handlers = await routeHandlers();
  world = await buildFixtureWorld();
  cookies.student = await sessionCookie(world.people.student.id);
  cookies.admin = await sessionCookie(world.people.admin.id);
  const open = await freshSubmission(world, 'submitted');
  const marked = await freshSubmission(world, 'marked');
  const row = await models().EmailOutbox.create({
    dedupeKey: 'bad-input:resend',
    toAddress: world.people.student.email,
    subject: 'Bad input resend',
    textBody: 'Test message.',
    htmlBody: null,
    submissionId: world.submission.id,
    feedbackDocumentId: null,
    status: 'failed',
    attempts: 5,
    nextAttemptAt: new Date(),
    lockedUntil: null,
    lastError: 'test',
    messageId: null,
    sentAt: null,
  });
  const registration = await createRegistration(
    { ...LTI_REGISTRATION, issuer: 'https://bad-input-platform.example' },
    world.people.admin.id,
  );
  const context = await connectContext(
    { registrationId: registration.id, contextId: 'bad-input-context', courseId: world.course.id },
    world.people.admin.id,
  );
  extra = {
    outboxId: row.id,
    open: { id: open.id, version: open.version },
    marked: { id: marked.id, version: marked.version },
    lti: { registrationId: registration.id, contextId: context.id },
  };
  extraDraftVersion = await version(world.draftB.id);
  world.submission = (await models().Submission.findByPk(world.submission.id))!;
  before = await tableChecksums();
  uploadsBefore = dirListing(process.env.UPLOAD_DIR!);
});

/** A sentence a person can act on: starts with a capital, several words, no internals. */
function readsAsSentence(error: unknown): boolean {
  return (
    typeof error === 'string' &&
    /^["'\p{Lu}\d]/u.test(error) &&
    error.trim().split(/\s+/).length >= 3 &&
    !/undefined|\[object |at \w+ \(|Sequelize|SQLITE|TypeError/.test(error)
  );
}

async function send(h: RouteHandler, e: Entry, v: Variant) {
  const { url, params: p } = e.call(world);
  const headers: Record<string, string> = e.as === 'anonymous' ? {} : { cookie: cookies[e.as]! };
  let rawBody: BodyInit | undefined;
  if (v.raw !== undefined) {
    rawBody = v.raw as BodyInit;
    headers['content-type'] = 'application/json';
  } else {
    rawBody = JSON.stringify(v.body);
    headers['content-type'] = 'application/json';
  }
  if (v.type !== undefined) {
    if (v.type === null) delete headers['content-type'];
    else headers['content-type'] = v.type;
  }
  const req = await apiRequest(url, { method: h.method, rawBody, headers });
  if (v.type === null) req.headers.delete('content-type');
  return h.handler(req, p ? params(p) : {});
}

function methodSource(source: string, method: string): string {
  const parts = source.split(/export (?:const|async function) (?=GET|POST|PUT|PATCH|DELETE)/);
  return parts.find((p) => p.startsWith(method)) ?? '';
}

describe('bad input', () => {
  it('every state-changing handler that reads JSON has a garbage entry (or a reason it reads none)', () => {
    const jsonHandlers = handlers
      .filter((h) => h.method !== 'GET' && /readJson\(/.test(methodSource(h.source, h.method)))
      .map((h) => h.key);
    const writers = handlers.filter((h) => h.method !== 'GET').map((h) => h.key);
    expect({
      missing: jsonHandlers.filter((k) => !(k in BAD)),
      notJson: jsonHandlers.filter((k) => k in NOT_JSON),
      stale: [...Object.keys(BAD), ...Object.keys(NOT_JSON)].filter((k) => !writers.includes(k)),
    }).toEqual({
      missing: [],
      notJson: [],
      stale: [],
    });
  });

  for (const [key, e] of Object.entries(BAD)) {
    it(key, async () => {
      const h = handlers.find((x) => x.key === key)!;
      expect(h, key).toBeDefined();
      // Each route's barrage is compared with the state after the previous one, to name the culprit.
      const start = last ?? before;
      const failures: string[] = [];
      const all = variants(e, e.body(world));
      for (const v of all) {
        const res = await send(h, e, v);
        const text = await res.text();
        let body: { error?: unknown } = {};
        try {
          body = JSON.parse(text);
        } catch {}
        if (res.status < 400 || res.status >= 500 || !readsAsSentence(body.error))
          failures.push(`${v.name}: ${res.status} ${text.slice(0, 160)}`);
      }
      expect(all.length).toBeGreaterThan(20);
      const end = await tableChecksums();
      last = end;
      expect(failures).toEqual([]);
      expect(Object.keys(end).filter((t) => end[t] !== start[t])).toEqual([]);
    });
  }

  it('garbage multipart uploads are refused with a 4xx and leave nothing in the upload directory', async () => {
    const h = handlers.find((x) => x.key === 'POST /api/uploads')!;
    const b = 'badinputboundary';
    const part = (name: string, value: string, filename?: string) =>
      `--${b}\r\nContent-Disposition: form-data; name="${name}"${filename !== undefined ? `; filename="${filename}"` : ''}\r\n${filename !== undefined ? 'Content-Type: application/octet-stream\r\n' : ''}\r\n${value}\r\n`;
    const id = String(world.draftC.id);
    const cases: [string, BodyInit, string][] = [
      ['no boundary', 'whatever', 'multipart/form-data'],
      ['wrong boundary', `${part('submissionId', id)}${part('kind', 'spectrum')}--${b}--\r\n`, 'multipart/form-data; boundary=other'],
      [
        'truncated',
        `${part('submissionId', id)}${part('kind', 'spectrum')}--${b}\r\nContent-Disposition: form-data; name="file"; filename="a.jdx"\r\n\r\n##TITLE=`,
        `multipart/form-data; boundary=${b}`,
      ],
      ['no file', `${part('submissionId', id)}${part('kind', 'spectrum')}--${b}--\r\n`, `multipart/form-data; boundary=${b}`],
      [
        'sql in submissionId',
        `${part('submissionId', SQLI)}${part('kind', 'spectrum')}${part('file', '##TITLE=x', 'a.jdx')}--${b}--\r\n`,
        `multipart/form-data; boundary=${b}`,
      ],
      [
        '1e309 submissionId',
        `${part('submissionId', '1e309')}${part('kind', 'spectrum')}${part('file', '##TITLE=x', 'a.jdx')}--${b}--\r\n`,
        `multipart/form-data; boundary=${b}`,
      ],
      [
        'html kind',
        `${part('submissionId', id)}${part('kind', '<script>alert(1)</script>')}${part('file', '##TITLE=x', 'a.jdx')}--${b}--\r\n`,
        `multipart/form-data; boundary=${b}`,
      ],
      [
        'two files',
        `${part('submissionId', id)}${part('kind', 'spectrum')}${part('file', '##TITLE=x', 'a.jdx')}${part('file2', '##TITLE=y', 'b.jdx')}--${b}--\r\n`,
        `multipart/form-data; boundary=${b}`,
      ],
      [
        'NUL and RTL in the file name',
        `${part('submissionId', id)}${part('kind', 'report')}${part('file', '%PDF-1.4 nonsense', 'a\u0000\u202Efdp.exe')}--${b}--\r\n`,
        `multipart/form-data; boundary=${b}`,
      ],
      [
        'JCAMP-DX DUP bomb (188 bytes, 200 million points)',
        `${part('submissionId', id)}${part('kind', 'spectrum')}${part('file', JCAMP_DUP_BOMB, 'bomb.jdx')}--${b}--\r\n`,
        `multipart/form-data; boundary=${b}`,
      ],
      [
        'garbage bytes as a spectrum',
        `${part('submissionId', id)}${part('kind', 'spectrum')}${part('file', '\u0000\u0001\u0002\uFFFD'.repeat(100), 'x.jdx')}--${b}--\r\n`,
        `multipart/form-data; boundary=${b}`,
      ],
      ['JSON body', JSON.stringify({ submissionId: Number(id), kind: 'spectrum' }), 'application/json'],
      ['text body', 'file contents', 'text/plain'],
    ];
    const start = await tableChecksums();
    const failures: string[] = [];
    for (const [name, body, type] of cases) {
      const filesBefore = dirListing(process.env.UPLOAD_DIR!);
      const res = await h.handler(
        await apiRequest('/api/uploads', { method: 'POST', rawBody: body, headers: { cookie: cookies.student!, 'content-type': type } }),
        {},
      );
      const text = await res.text();
      let json: { error?: unknown } = {};
      try {
        json = JSON.parse(text);
      } catch {}
      if (res.status < 400 || res.status >= 500 || !readsAsSentence(json.error))
        failures.push(`${name}: ${res.status} ${text.slice(0, 160)}`);
      await new Promise((r) => setTimeout(r, 100)); // let any file stream still open finish
      const left = dirListing(process.env.UPLOAD_DIR!).filter((f) => !filesBefore.includes(f));
      if (left.length) failures.push(`${name}: left ${left.join(', ')}`);
    }
    expect(failures).toEqual([]);
    expect(dirListing(process.env.UPLOAD_DIR!)).toEqual(uploadsBefore);
    const end = await tableChecksums();
    expect(Object.keys(end).filter((t) => end[t] !== start[t])).toEqual([]);
  });

  it('the database is byte-for-byte what it was before the whole barrage', async () => {
    expect(await tableChecksums()).toEqual(before);
    expect(dirListing(process.env.UPLOAD_DIR!)).toEqual(uploadsBefore);
  });
});
