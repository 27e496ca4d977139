import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { actionId, specOf } from '../../support/routes';
import { APP_URL } from '../support/http';
import { demoIds, fill, GET_ROUTES, PAGES, SERVER_ACTIONS, VISITORS, WRITE_ROUTES, type DemoIds, type Visitor, type WriteEntry } from '../../support/surface';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';

// The role matrix: every page, GET route, write route and server action of tests/support/surface.ts × every visitor
// (no session, each role, and a client of another owner), against the expected allow or deny.
//
//   page        allow: 200 with the page, or a redirect on (e.g. / to the role's home)
//               deny:  a redirect to /sign-in or /no-access (3xx, or from inside the stream), or not found (404, or streamed)
//   GET route   allow: 200                        deny: 401, 403, or 404 (a record the visitor may not see)
//   write route allow: 422 invalid_input          deny: 401 or 403
//   server action allow: its state with a message deny: a redirect to /sign-in or /no-access
//
// A write route gets an input its wrapper refuses only after the role check: an id of 0 in every
// bracketed segment (ids are positive), or — a route without ids — a JSON body that is an array
// where an object is expected. So an allowed visitor reaches validation and a refused one never does,
// and nothing changes either way. next-auth's own POST (open to everyone) gets a sign-in without its
// CSRF token: anything but 401/403 or a 5xx is its allow.
afterAll(closeTestDb);

const EMAIL: Record<Exclude<Visitor, 'anonymous'>, string> = {
  technician: USERS.tech,
  veterinarian: USERS.vet,
  lab_manager: USERS.manager,
  client: USERS.owner,
  other_client: USERS.otherOwner,
};
let ids: DemoIds;
/** The demo owner's stallion: a refused answer to anyone else must not name him. */
let ownedName: string;
const sessions = {} as Record<Visitor, Session>;

beforeAll(async () => {
  ids = await demoIds(testDb());
  ownedName = (await testDb()('stallions').where({ id: ids.stallion }).first('name')).name;
  sessions.anonymous = new Session();
  for (const [visitor, email] of Object.entries(EMAIL)) sessions[visitor as Visitor] = await signedIn(email);
});

type Outcome = 'allow' | 'deny' | 'other';
type Probe = { label: string; outcome: Outcome; status: number; body?: string };

async function probePage(visitor: Visitor, path: string): Promise<Probe> {
  const url = fill(path, ids);
  const res = await sessions[visitor].fetch(url);
  const html = await res.text();
  // Behind a loading boundary the status (200) is sent before the page decides: Next then redirects
  // or shows the not-found page from inside the stream.
  const streamedAway = /NEXT_REDIRECT;\w+;\/(sign-in|no-access)[;?]|NEXT_HTTP_ERROR_FALLBACK;404/.test(html);
  const redirected = res.status >= 300 && res.status < 400;
  const sentAway = redirected && /^\/(sign-in|no-access)(\?|$)/.test(new URL(res.headers.get('location') ?? '', 'http://x').pathname);
  let outcome: Outcome = 'other';
  if (res.status === 200) outcome = streamedAway ? 'deny' : 'allow';
  else if (redirected) outcome = sentAway ? 'deny' : 'allow';
  else if (res.status === 404) outcome = 'deny';
  return { label: `page ${url}`, status: res.status, outcome, body: html };
}

async function probeGet(visitor: Visitor, path: string): Promise<Probe> {
  const url = fill(path, ids);
  const res = await sessions[visitor].fetch(url);
  const body = await res.text();
  return { label: `GET ${url}`, status: res.status, outcome: res.status === 200 ? 'allow' : [401, 403, 404].includes(res.status) ? 'deny' : 'other', body };
}

async function probeWrite(visitor: Visitor, entry: WriteEntry): Promise<Probe> {
  const spec = await specOf(entry.method, entry.path);
  const s = sessions[visitor];
  if (!spec) {
    // next-auth: a credentials sign-in without a CSRF token.
    const res = await s.fetch('/api/auth/callback/credentials', { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'email=x&password=y' });
    await res.arrayBuffer();
    return { label: `POST /api/auth/callback/credentials`, status: res.status, outcome: res.status < 500 && ![401, 403].includes(res.status) ? 'allow' : 'other' };
  }
  const hasIds = /\[\w+\]/.test(entry.path);
  if (!hasIds && !spec.body) throw new Error(`${entry.method} ${entry.path}: no id and no body to make invalid — give the matrix a probe for it`);
  const url = hasIds ? entry.path.replace(/\[\w+\]/g, '0') : entry.path;
  const res = await s.fetch(url, { method: entry.method, headers: { 'content-type': 'application/json' }, body: '[]' });
  const body = (await res.json().catch(() => null)) as { error?: { code?: string } } | null;
  const outcome: Outcome = res.status === 422 && body?.error?.code === 'invalid_input' ? 'allow' : [401, 403].includes(res.status) ? 'deny' : 'other';
  return { label: `${entry.method} ${url}`, status: res.status, outcome };
}

/**
 * A server action, called as its form would be but with nothing filled in: allowed, it answers with
 * its state and a message (the fields to fix); refused, it redirects to /sign-in or /no-access.
 */
async function probeAction(visitor: Visitor, action: (typeof SERVER_ACTIONS)[number]): Promise<Probe> {
  const url = fill(action.page, ids);
  const res = await sessions[visitor].fetch(url, {
    method: 'POST',
    headers: { 'next-action': actionId(action.file, action.name), origin: new URL(APP_URL).origin, 'content-type': 'text/plain;charset=UTF-8' },
    body: '[{},{}]',
  });
  const body = await res.text();
  const redirected = /NEXT_REDIRECT;\w+;\/(sign-in|no-access)|^\/(sign-in|no-access)/.test(body + (res.headers.get('x-action-redirect') ?? ''));
  const outcome: Outcome = redirected ? 'deny' : res.status === 200 && /"message":"[^"]+"/.test(body) ? 'allow' : 'other';
  return { label: `server action ${action.name} on ${url}`, status: res.status, outcome };
}

describe('the role matrix', () => {
  it('every page, GET route, write route and server action × every visitor: no unexpected allow, no unexpected deny', { timeout: 240_000 }, async () => {
    const rows: { visitor: Visitor; expected: 'allow' | 'deny'; probe: Probe }[] = [];
    for (const visitor of VISITORS) {
      for (const p of PAGES) rows.push({ visitor, expected: p.roles.includes(visitor) ? 'allow' : 'deny', probe: await probePage(visitor, p.path) });
      for (const r of GET_ROUTES) rows.push({ visitor, expected: r.roles.includes(visitor) ? 'allow' : 'deny', probe: await probeGet(visitor, r.path) });
      for (const w of WRITE_ROUTES) rows.push({ visitor, expected: w.roles.includes(visitor) ? 'allow' : 'deny', probe: await probeWrite(visitor, w) });
      for (const a of SERVER_ACTIONS) rows.push({ visitor, expected: a.roles.includes(visitor) ? 'allow' : 'deny', probe: await probeAction(visitor, a) });
    }
    const count = (f: (r: (typeof rows)[number]) => boolean) => rows.filter(f).length;
    const unexpectedAllows = rows.filter((r) => r.expected === 'deny' && r.probe.outcome !== 'deny');
    const unexpectedDenies = rows.filter((r) => r.expected === 'allow' && r.probe.outcome !== 'allow');
    // A refusal shows nothing of the record: the other owner's client never sees the demo owner's stallion named.
    const leaks = rows.filter((r) => r.visitor === 'other_client' && r.expected === 'deny' && r.probe.body?.includes(ownedName));
    const lines = VISITORS.map((v) => {
      const mine = rows.filter((r) => r.visitor === v);
      return `${v.padEnd(13)} ${String(mine.filter((r) => r.expected === 'allow').length).padStart(5)} ${String(mine.filter((r) => r.expected === 'deny').length).padStart(5)}`;
    });
    console.log(
      [
        `role matrix: ${PAGES.length} pages + ${GET_ROUTES.length} GET routes + ${WRITE_ROUTES.length} write routes + ${SERVER_ACTIONS.length} server actions × ${VISITORS.length} visitors = ${rows.length} cells`,
        `visitor       allow  deny`,
        ...lines,
        `unexpected allows: ${unexpectedAllows.length}, unexpected denies: ${unexpectedDenies.length}, 5xx: ${count((r) => r.probe.status >= 500)}`,
      ].join('\n'),
    );
    const show = (r: (typeof rows)[number]) => `${r.visitor}: ${r.probe.label} → ${r.probe.status} (expected ${r.expected})`;
    expect(unexpectedAllows.map(show), 'unexpected allows').toEqual([]);
    expect(unexpectedDenies.map(show), 'unexpected denies').toEqual([]);
    expect(leaks.map(show), `refusals naming ${ownedName}`).toEqual([]);
  });
});
