import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { corpusFor, uploadCorpusFor, type BadRequest, type RouteInput } from '../../support/bad-input';
import { actionId, handlerOf } from '../../support/routes';
import { demoIds, fill, GET_ROUTES, SERVER_ACTIONS, WRITE_ROUTES, type DemoIds, type ExampleContext, type Visitor, type WriteEntry } from '../../support/surface';
import { auditSince, CHANGES_ON_ITS_OWN, COUNTED_ONLY, dbState, jobsIdle, type DbState } from '../support/db-state';
import { closeTestDb, testDb } from '../support/db';
import { APP_URL, randomLoopback, Session, signedIn, USERS } from '../support/http';
import { objectList } from '../support/s3';

// The bad-input corpus (tests/support/bad-input.ts): for every route handler, requests made from its own
// schemas that it must refuse — each answered with a 4xx and a JSON message a person can act on (never
// a 5xx, never a stack trace) — and afterwards the database (row counts and CHECKSUM TABLE of every
// table but those in CHANGES_ON_ITS_OWN) and the object store's list are as before, and the server
// still answers. Prints how many requests each route got.
afterAll(closeTestDb);

const JSON_LIMIT = Number(process.env.JSON_BODY_LIMIT_KB ?? 1024) * 1024;
const UPLOAD_MAX = Number(process.env.UPLOAD_MAX_MB ?? 8) * 1024 * 1024;
const EMAIL: Partial<Record<Visitor, string>> = { technician: USERS.tech, veterinarian: USERS.vet, lab_manager: USERS.manager, client: USERS.owner };
const PREFERENCE: Visitor[] = ['technician', 'veterinarian', 'lab_manager', 'client'];
/** A stack frame, a file path, a raw error name: what must never reach a person. */
const LEAKS = /\n\s+at\s|node_modules|\/work\/|webpack|\.tsx?:\d+|\b(TypeError|ReferenceError|SyntaxError|ER_[A-Z_]+|SQLSTATE)\b/;

let ids: DemoIds;
const sessions = {} as Record<Visitor, Session>;
let before: DbState;
let objectsBefore: string[];
let image: Uint8Array;
/** The second technician, who writes into the first one's read. */
let reader: Session;

beforeAll(async () => {
  ids = await demoIds(testDb());
  for (const [v, email] of Object.entries(EMAIL)) sessions[v as Visitor] = await signedIn(email!);
  sessions.anonymous = new Session();
  reader = await signedIn(USERS.reader);
  image = new Uint8Array(await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 200, g: 120, b: 160 } } }).png().toBuffer());
  await jobsIdle(testDb());
  before = await dbState(testDb());
  objectsBefore = await objectList();
}, 120_000);

type Problem = string;

async function send(session: Session, r: BadRequest): Promise<Problem | null> {
  const res = await session.fetch(r.path, { method: r.method, headers: r.headers, body: r.body as BodyInit | undefined });
  const text = await res.text();
  const what = `${r.method} ${r.path.slice(0, 120)} [${r.kind}] → ${res.status}`;
  if (res.status >= 500) return `${what}: ${text.slice(0, 200)}`;
  if (LEAKS.test(text)) return `${what}: leaks internals: ${text.slice(0, 200)}`;
  if (r.expect === 'no5xx') return null;
  if (res.status < 400) return `${what}: accepted (expected a 4xx)`;
  let message: unknown;
  try {
    message = (JSON.parse(text) as { error?: { message?: unknown } }).error?.message;
  } catch {
    return `${what}: not JSON: ${text.slice(0, 120)}`;
  }
  if (typeof message !== 'string' || message.length < 12) return `${what}: no message a person can act on: ${text.slice(0, 120)}`;
  return null;
}

/**
 * Malformed calls of a server action taking (previous state, form): arguments of the wrong type (as
 * React encodes plain values), a form (as React encodes FormData: "$K1" and fields prefixed "1_")
 * with bad fields, and a body that is no encoding at all. Each must come back as the action's
 * answer with a message (never the framework's error), changing nothing.
 */
function actionCorpus(path: string, id: string): BadRequest[] {
  const headers = { 'next-action': id, origin: new URL(APP_URL).origin };
  const plain = ['[{},{"token":"x"}]', '[{},null]', '[{},"a string"]', '[{},42]', '[{}]', '[{},[1,2]]', `[{},{"token":"${'A'.repeat(40)}","password":{"$gt":""},"confirm":1}]`, '[null,{"token":"\' OR 1=1 --"}]'];
  const out: BadRequest[] = plain.map((body) => ({ kind: 'wrong argument types', method: 'POST', path, headers: { ...headers, 'content-type': 'text/plain;charset=UTF-8' }, body, expect: '4xx' }));
  const tokens = ['', 'short', 'A'.repeat(40), 'A'.repeat(101), "' OR '1'='1' --", '<script>alert(1)</script>', '../../etc/passwd', 'x\u0000y'];
  const passwords = ['', 'short', 'p'.repeat(10_000), "' OR 1=1 --aaaaaa", 'long enough password'];
  for (const token of tokens) {
    for (const password of passwords) {
      const fields: [string, string][] = [['0', '[{},"$K1"]'], ['1_token', token], ['1_password', password], ['1_confirm', password === 'short' ? 'different' : password]];
      const boundary = 'corpusBoundary7MA4YWxkTrZu0gW';
      const body = fields.map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`).join('') + `--${boundary}--\r\n`;
      out.push({ kind: 'form fields', method: 'POST', path, headers: { ...headers, 'content-type': `multipart/form-data; boundary=${boundary}` }, body, expect: '4xx' });
    }
  }
  return out;
}

async function sendAction(session: Session, r: BadRequest): Promise<Problem | null> {
  const res = await session.fetch(r.path, { method: r.method, headers: r.headers, body: r.body as BodyInit | undefined });
  const text = await res.text();
  const what = `${r.method} ${r.path} (server action) [${r.kind}] → ${res.status}`;
  if (res.status >= 500 || /^\d+:E\{/m.test(text)) return `${what}: ${text.slice(0, 200)}`;
  if (LEAKS.test(text)) return `${what}: leaks internals: ${text.slice(0, 200)}`;
  if (!/"message":"[^"]{12,}"/.test(text)) return `${what}: no message a person can act on: ${text.slice(0, 200)}`;
  return null;
}

async function inputFor(method: string, path: string, entry?: WriteEntry): Promise<RouteInput | null> {
  const { route, spec } = await handlerOf(method, path);
  if (!spec) return null;
  const ctx: ExampleContext = { ids, get: async (p) => (await sessions.lab_manager.json(p)).body };
  const example = typeof entry?.example === 'function' ? await (entry.example as (c: ExampleContext) => unknown)(ctx) : entry?.example;
  if (example !== undefined && spec.body) {
    const check = spec.body.safeParse(example);
    if (!check.success) throw new Error(`The example of ${method} ${path} in tests/support/surface.ts no longer passes the route's schema: ${check.error.message}`);
  }
  return {
    method,
    path,
    fill: (p) => fill(p, ids),
    fileRoute: route,
    params: spec.params,
    query: spec.query,
    body: spec.body,
    example,
    exampleQuery: entry?.exampleQuery,
    noValidBodies: Boolean(entry?.noValidBodies),
    jsonLimitBytes: JSON_LIMIT,
  };
}

/** The upload's path for a collection a signed report locks (the demo's, unless a test amended it), or null when none is. */
async function lockedCollectionPath(path: string): Promise<string | null> {
  const own = await testDb()('collections').where({ id: ids.collection }).whereNotNull('signed_report_id').first('id');
  const any = own ?? (await testDb()('collections').whereNotNull('signed_report_id').orderBy('id').first('id'));
  return any ? path.replace('[collection]', String(any.id)) : null;
}

const sessionFor = (roles: readonly Visitor[]) => sessions[PREFERENCE.find((v) => roles.includes(v)) ?? 'anonymous'];

describe('the bad-input corpus', () => {
  it('every route refuses every malformed request with a 4xx and a message, and nothing changes', { timeout: 600_000 }, async () => {
    const counts: [string, number][] = [];
    const problems: Problem[] = [];
    const run = async (label: string, session: Session, requests: BadRequest[]) => {
      // A few at a time: the corpus is about answers, not load.
      for (let i = 0; i < requests.length; i += 4) {
        const got = await Promise.all(requests.slice(i, i + 4).map((r) => send(session, r)));
        problems.push(...(got.filter(Boolean) as Problem[]));
      }
      counts.push([label, requests.length]);
    };

    for (const entry of WRITE_ROUTES) {
      const input = await inputFor(entry.method, entry.path, entry);
      if (!input) continue;
      const isUpload = entry.method === 'POST' && !input.body && input.query && entry.exampleQuery?.name;
      const requests = isUpload ? [...corpusFor(input), ...uploadCorpusFor(input, image, UPLOAD_MAX, await lockedCollectionPath(entry.path))] : corpusFor(input);
      await run(`${entry.method} ${entry.path}`, sessionFor(entry.roles), requests);
    }
    for (const entry of GET_ROUTES) {
      const input = await inputFor('GET', entry.path);
      if (!input || (!input.params && !input.query)) continue;
      await run(`GET ${entry.path}`, sessionFor(entry.roles), corpusFor(input));
    }

    // Other people's records: the demo client asks for the other owner's stallion and report; the second
    // technician writes into the first one's read.
    const other: BadRequest[] = [
      ...['/api/stallions/[otherStallion]', '/api/reports/[otherReport]', '/api/reports/[otherReport]/pdf'].map((p) => ({ kind: 'other owner’s record', method: 'GET', path: fill(p, ids), headers: {}, expect: '4xx' as const })),
      ...['/portal/stallions/[otherStallion]', '/portal/reports/[otherReport]'].map((p) => ({ kind: 'other owner’s page', method: 'GET', path: fill(p, ids), headers: {}, expect: 'no5xx' as const })),
    ];
    await run('client: another owner’s records', sessions.client, other);
    const sync = WRITE_ROUTES.find((w) => w.path === '/api/reads/[read]/sync')!;
    const syncBody = JSON.stringify(await (sync.example as (c: ExampleContext) => unknown)({ ids, get: async () => null }));
    await run('technician: another reader’s read', reader, [
      { kind: 'other reader’s read', method: 'POST', path: fill('/api/reads/[read]/sync', ids), headers: { 'content-type': 'application/json' }, body: syncBody, expect: '4xx' },
      { kind: 'other reader’s read', method: 'POST', path: fill('/api/reads/[read]/submit', ids), headers: {}, expect: '4xx' },
    ]);
    // next-auth's sign-in, malformed: never a 5xx, never a session. From an address of its own, with
    // e-mails no one has, so no one's sign-in limit is spent.
    const stranger = new Session({ from: randomLoopback() });
    const csrf = (await stranger.json<{ csrfToken: string }>('/api/auth/csrf')).body.csrfToken;
    const form = (f: Record<string, string>) => new URLSearchParams(f).toString();
    const auth: BadRequest[] = [
      ...['', "' OR '1'='1", '<script>x</script>@x.example', 'a'.repeat(5000), '../../etc/passwd', '%00'].map((email) => ({
        kind: 'sign-in',
        method: 'POST',
        path: '/api/auth/callback/credentials',
        headers: { 'content-type': 'application/x-www-form-urlencoded' },
        body: form({ csrfToken: csrf, email, password: "' OR 1=1 --", json: 'true' }),
        expect: 'no5xx' as const,
      })),
      { kind: 'sign-in without CSRF', method: 'POST', path: '/api/auth/callback/credentials', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: form({ email: USERS.tech, password: 'x' }), expect: 'no5xx' },
      { kind: 'sign-in as JSON', method: 'POST', path: '/api/auth/callback/credentials', headers: { 'content-type': 'application/json' }, body: '{"email": {"$gt": ""}}', expect: 'no5xx' },
      { kind: 'sign-in malformed', method: 'POST', path: '/api/auth/callback/credentials', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: '%%%&&&===', expect: 'no5xx' },
      { kind: 'oversize body', method: 'POST', path: '/api/auth/callback/credentials', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: `email=${'a'.repeat(JSON_LIMIT + 10)}`, expect: '4xx' },
    ];
    await run('POST /api/auth/[...nextauth]', stranger, auth);
    expect((await stranger.json('/api/auth/session')).body ?? {}).not.toHaveProperty('user');

    // Server actions.
    for (const a of SERVER_ACTIONS) {
      const requests = actionCorpus(fill(a.page, ids), actionId(a.file, a.name));
      const session = sessionFor(a.roles);
      for (let i = 0; i < requests.length; i += 4) {
        const got = await Promise.all(requests.slice(i, i + 4).map((r) => sendAction(session, r)));
        problems.push(...(got.filter(Boolean) as Problem[]));
      }
      counts.push([`server action ${a.file}#${a.name}`, requests.length]);
    }

    const total = counts.reduce((n, [, c]) => n + c, 0);
    console.log(
      [`bad-input corpus: ${total} requests over ${counts.length} routes (not compared: ${CHANGES_ON_ITS_OWN.filter((t) => !COUNTED_ONLY.includes(t)).join(', ')} — audit_log may gain refusals only; rows counted only: ${COUNTED_ONLY.join(', ')})`, ...counts.map(([r, c]) => `${String(c).padStart(5)}  ${r}`)].join('\n'),
    );
    expect(problems).toEqual([]);
    expect(total).toBeGreaterThanOrEqual(1000);

    // Nothing changed, and the server still answers.
    await jobsIdle(testDb());
    expect((await dbState(testDb())).tables).toEqual(before.tables);
    const audited = await auditSince(testDb(), before);
    expect(audited.filter((a) => !/refused|failed/.test(a.action))).toEqual([]);
    expect(await objectList()).toEqual(objectsBefore);
    expect((await new Session().json('/api/health')).status).toBe(200);
    expect((await sessions.technician.json('/api/stallions')).status).toBe(200);
  });
});
