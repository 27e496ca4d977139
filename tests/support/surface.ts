// The app's whole surface — every page, GET API route, write route and server action, with the
// visitors (each role, no session, and a client of another owner) that may use it: the role matrix.
// A new page or route is added HERE (tests/unit/surface.test.ts fails until it is), and then
// tests/integration/surface/role-matrix.test.ts tries every entry as every visitor (allowed: 200, or
// 422 for a write route given an invalid input; refused: 401/403/404 or a redirect away),
// tests/integration/security/bad-input.test.ts sends every route and server action its corpus of
// malformed requests, tests/e2e/smoke.spec.ts opens each page in the browser as every role (no 5xx,
// no page error, no console error) and tests/integration/surface/staff-pages-rsc.test.ts checks no
// staff page data reaches a client.
//
// Paths name demo records in brackets — [stallion], [collection], [read], [image], [client], [mark],
// [user], [classSet], [invitation], [report], [code], [otherStallion], [otherReport] — which demoIds()
// looks up in the seeded database at test time.
import type { Knex } from 'knex';
import type { Role } from '../../lib/auth/roles';
import { DEMO_CLIENT_USER_EMAIL, DEMO_FEVER, DEMO_OTHER_CLIENT_USER_EMAIL } from '../../lib/demo/scenario';

/** 'other_client': a client user of another owner (the demo's second owner), who must not see the first owner's records. */
export type Visitor = Role | 'anonymous' | 'other_client';
export type Entry = { path: string; roles: readonly Visitor[] };
export const VISITORS: readonly Visitor[] = ['anonymous', 'technician', 'veterinarian', 'lab_manager', 'client', 'other_client'];

export const STAFF: readonly Visitor[] = ['technician', 'veterinarian', 'lab_manager'];
export const READERS: readonly Visitor[] = ['technician', 'veterinarian'];
export const CLIENTS: readonly Visitor[] = ['client', 'other_client'];
export const SIGNED_IN: readonly Visitor[] = [...STAFF, ...CLIENTS];
export const EVERYONE: readonly Visitor[] = ['anonymous', ...SIGNED_IN];
/** A record of the demo client's (her stallion, her report): staff, and her — not the other owner. */
const STAFF_AND_OWNER: readonly Visitor[] = [...STAFF, 'client'];

export const PAGES: Entry[] = [
  // A signed-in visitor is sent on to their home page.
  { path: '/sign-in', roles: EVERYONE },
  { path: '/invite/[invitation]', roles: EVERYONE },
  { path: '/', roles: SIGNED_IN },
  { path: '/help', roles: SIGNED_IN },
  { path: '/no-access', roles: SIGNED_IN },
  { path: '/portal', roles: CLIENTS },
  { path: '/portal/stallions/[stallion]', roles: ['client'] },
  { path: '/portal/reports/[report]', roles: ['client'] },
  { path: '/verify', roles: EVERYONE },
  { path: '/verify/[code]', roles: EVERYONE },
  { path: '/dashboard', roles: STAFF },
  { path: '/stallions', roles: STAFF },
  { path: '/stallions/new', roles: STAFF },
  { path: '/stallions/[stallion]', roles: STAFF },
  { path: '/stallions/[stallion]/edit', roles: STAFF },
  { path: '/stallions/[stallion]/history', roles: STAFF },
  { path: '/collections', roles: STAFF },
  { path: '/collections/new', roles: STAFF },
  { path: '/collections/[collection]', roles: STAFF },
  { path: '/collections/[collection]/edit', roles: STAFF },
  { path: '/collections/[collection]/report', roles: STAFF },
  { path: '/collections/[collection]/settle', roles: STAFF },
  { path: '/reports', roles: STAFF },
  { path: '/reports/[report]', roles: STAFF },
  { path: '/clients', roles: STAFF },
  { path: '/clients/[client]', roles: STAFF },
  { path: '/reads/[read]', roles: STAFF },
  { path: '/admin/users', roles: ['lab_manager'] },
  { path: '/admin/class-sets', roles: ['lab_manager'] },
  { path: '/admin/settings', roles: ['lab_manager'] },
  { path: '/admin/audit', roles: ['lab_manager'] },
  { path: '/admin/reader-quality', roles: ['lab_manager'] },
];

export const GET_ROUTES: Entry[] = [
  { path: '/api/health', roles: EVERYONE },
  { path: '/api/auth/session', roles: EVERYONE },
  { path: '/api/auth/csrf', roles: EVERYONE },
  { path: '/api/auth/providers', roles: EVERYONE },
  { path: '/api/stallions', roles: SIGNED_IN },
  { path: '/api/stallions/[stallion]', roles: STAFF_AND_OWNER },
  { path: '/api/stallions/[stallion]/testis', roles: STAFF },
  { path: '/api/stallions/[stallion]/health-events', roles: STAFF },
  { path: '/api/stallions/[stallion]/history', roles: STAFF },
  { path: '/api/stallions/[stallion]/export', roles: STAFF },
  { path: '/api/health-events/[healthEvent]', roles: STAFF },
  { path: '/api/clients', roles: STAFF },
  { path: '/api/clients/[client]', roles: STAFF },
  { path: '/api/collections', roles: STAFF },
  { path: '/api/collections/export', roles: STAFF },
  { path: '/api/collections/[collection]', roles: STAFF },
  { path: '/api/collections/[collection]/images', roles: STAFF },
  { path: '/api/collections/[collection]/morphology', roles: STAFF },
  { path: '/api/collections/[collection]/reads', roles: STAFF },
  { path: '/api/collections/[collection]/agreement', roles: STAFF },
  { path: '/api/collections/[collection]/report', roles: STAFF },
  { path: '/api/collections/[collection]/settle', roles: STAFF },
  { path: '/api/reports', roles: SIGNED_IN },
  { path: '/api/reports/[report]', roles: STAFF_AND_OWNER },
  { path: '/api/reports/[report]/pdf', roles: STAFF_AND_OWNER },
  { path: '/api/audit', roles: ['lab_manager'] },
  { path: '/api/reader-quality', roles: ['lab_manager'] },
  { path: '/api/reads/[read]', roles: STAFF },
  { path: '/api/images/[image]/thumb', roles: STAFF },
  { path: '/api/images/[image]/display', roles: STAFF },
  { path: '/api/images/[image]/original', roles: STAFF },
  { path: '/api/images/[image]/candidates', roles: STAFF },
  { path: '/api/settings', roles: STAFF },
  { path: '/api/class-sets', roles: STAFF },
  { path: '/api/users', roles: ['lab_manager'] },
];

/** The methods that change something. */
export type WriteMethod = 'POST' | 'PUT' | 'PATCH' | 'DELETE';
/** What a corpus example may look up: the demo ids, and a GET as the lab manager (e.g. the current settings to send back). */
export type ExampleContext = { ids: DemoIds; get: (path: string) => Promise<any> };
export type WriteEntry = Entry & {
  method: WriteMethod;
  /** A valid body (the bad-input corpus breaks it field by field); a function when it depends on the demo's data. */
  example?: unknown | ((c: ExampleContext) => unknown | Promise<unknown>);
  /** A valid query string (the upload's file name and scale). */
  exampleQuery?: Record<string, string>;
  /** Why bodies that pass the schema are never sent, not even to an unknown record (they would still change something). */
  noValidBodies?: string;
};

const UUID_A = '0b7c2f3e-9d41-4c5a-8e6f-1a2b3c4d5e6f';
const UUID_B = '5e6f7a8b-1c2d-4e3f-9a0b-c1d2e3f4a5b6';
const stallionBody = (c: ExampleContext) => ({ name: 'Corpus Stallion', clientId: Number(c.ids.client), breed: 'Arabian', foalingYear: 2015, notes: 'corpus' });
const collectionBody = (c: ExampleContext) => ({
  stallionId: Number(c.ids.stallion),
  collectedAt: '2026-05-01T08:00:00.000Z',
  volumeMl: 50,
  concentrationMillionPerMl: 200,
  totalMotilityPct: 70,
  progressiveMotilityPct: 60,
  preparation: 'eosin_nigrosin',
  optics: 'bright_field',
  magnification: 1000,
  remarks: 'corpus',
});
const healthEventBody = { kind: 'fever', startedOn: '2026-05-01', endedOn: '2026-05-02', peakTemperatureC: 39.5, notes: 'corpus' };
const clientBody = { name: 'Corpus Client', kind: 'owner', email: 'corpus@quillfield.example', phone: '01632 960000', notes: 'corpus' };
const classSetBody = async (c: ExampleContext) => {
  const { classSets } = await c.get('/api/class-sets');
  const set = classSets[0];
  return { name: 'Corpus class set', classes: set.classes };
};
const markBody = (c: ExampleContext) => ({ opId: UUID_B, imageId: Number(c.ids.image), x: 120.5, y: 80.25, classKey: 'normal', tags: [] });

/**
 * Every route that changes something (POST, PUT, PATCH, DELETE), with the visitors it lets in. The role
 * matrix sends each an input the wrapper must refuse after its role check (a body that is not an
 * object, or an id of 0), so an allowed visitor gets 422 and a refused one 401/403, and nothing
 * changes. `/api/auth/[...nextauth]` is next-auth's own (sign-in, sign-out), open to everyone.
 */
export const WRITE_ROUTES: WriteEntry[] = [
  { method: 'POST', path: '/api/auth/[...nextauth]', roles: EVERYONE },
  { method: 'POST', path: '/api/stallions', roles: STAFF, example: stallionBody, noValidBodies: 'it creates a stallion' },
  { method: 'PATCH', path: '/api/stallions/[stallion]', roles: STAFF, example: stallionBody },
  { method: 'POST', path: '/api/stallions/[stallion]/testis', roles: STAFF, example: { measuredOn: '2026-05-01', method: 'caliper', leftLengthCm: 10, leftWidthCm: 6, leftHeightCm: 5, totalWidthCm: 11 } },
  { method: 'POST', path: '/api/stallions/[stallion]/health-events', roles: READERS, example: healthEventBody },
  { method: 'PATCH', path: '/api/health-events/[healthEvent]', roles: READERS, example: healthEventBody },
  { method: 'DELETE', path: '/api/health-events/[healthEvent]', roles: READERS },
  { method: 'POST', path: '/api/clients', roles: STAFF, example: clientBody, noValidBodies: 'it creates a client' },
  { method: 'PATCH', path: '/api/clients/[client]', roles: STAFF, example: clientBody },
  { method: 'POST', path: '/api/collections', roles: STAFF, example: collectionBody, noValidBodies: 'it creates a collection' },
  { method: 'PATCH', path: '/api/collections/[collection]', roles: STAFF, example: collectionBody },
  { method: 'POST', path: '/api/collections/[collection]/images', roles: READERS, exampleQuery: { name: 'field-01.png', micronsPerPixel: '0.1', magnification: '1000', optics: 'bright_field' } },
  { method: 'PATCH', path: '/api/collections/[collection]/images', roles: READERS, example: { micronsPerPixel: 0.1 } },
  { method: 'POST', path: '/api/collections/[collection]/reads', roles: READERS, example: { kind: 'first' } },
  {
    method: 'POST',
    path: '/api/collections/[collection]/settle',
    roles: READERS,
    example: (c: ExampleContext) => ({ decisions: [{ opId: UUID_B, key: `${c.ids.image}:${UUID_A}:`, decision: 'first' }] }),
  },
  { method: 'PUT', path: '/api/collections/[collection]/report', roles: ['veterinarian'], example: { remarks: 'corpus', interpretation: 'corpus' } },
  { method: 'POST', path: '/api/collections/[collection]/report/sign', roles: ['veterinarian'], example: { password: 'not-the-password', remarks: 'corpus' }, noValidBodies: 'a wrong password counts against the veterinarian’s sign-in limit' },
  { method: 'PATCH', path: '/api/images/[image]', roles: READERS, example: { move: 'down', micronsPerPixel: 0.1 } },
  { method: 'DELETE', path: '/api/images/[image]', roles: READERS },
  { method: 'POST', path: '/api/images/[image]/candidates', roles: STAFF },
  { method: 'PUT', path: '/api/reads/[read]/marks/[mark]', roles: READERS, example: markBody },
  { method: 'DELETE', path: '/api/reads/[read]/marks/[mark]', roles: READERS, exampleQuery: { opId: UUID_B } },
  { method: 'POST', path: '/api/reads/[read]/submit', roles: READERS },
  {
    method: 'POST',
    path: '/api/reads/[read]/sync',
    roles: READERS,
    example: (c: ExampleContext) => ({ changes: [{ opId: UUID_B, markId: UUID_A, kind: 'upsert', baseVersion: 0, queuedAt: 1, payload: { imageId: Number(c.ids.image), x: 10, y: 20, classKey: 'normal', tags: [] } }] }),
  },
  { method: 'POST', path: '/api/reports/[report]/amend', roles: ['veterinarian'], example: { reason: 'Corpus: a figure was typed wrongly.' } },
  { method: 'POST', path: '/api/reports/[report]/pdf', roles: ['veterinarian', 'lab_manager'] },
  { method: 'POST', path: '/api/reports/[report]/send', roles: ['veterinarian', 'lab_manager'], example: { includeOwner: false, to: ['corpus@quillfield.example'], message: 'corpus' } },
  { method: 'POST', path: '/api/class-sets', roles: ['lab_manager'], example: classSetBody, noValidBodies: 'it creates a class set' },
  { method: 'PUT', path: '/api/class-sets/[classSet]', roles: ['lab_manager'], example: classSetBody },
  { method: 'PUT', path: '/api/settings', roles: ['lab_manager'], example: async (c: ExampleContext) => (await c.get('/api/settings')).settings, noValidBodies: 'the lab has one settings record' },
  { method: 'POST', path: '/api/users', roles: ['lab_manager'], example: { email: 'corpus@quillfield.example', name: 'Corpus Person', role: 'technician' }, noValidBodies: 'it invites someone' },
  { method: 'PATCH', path: '/api/users/[user]', roles: ['lab_manager'], example: { active: true } },
  { method: 'POST', path: '/api/users/[user]/password-link', roles: ['lab_manager'] },
];

/**
 * Every server action (each export of a 'use server' file), the page whose form calls it, and who may
 * (the invitation's checks a one-time token, not a session). The bad-input corpus calls each with malformed arguments.
 */
export const SERVER_ACTIONS: { file: string; name: string; page: string; roles: readonly Visitor[] }[] = [
  { file: 'app/invite/[token]/actions.ts', name: 'acceptInvitationAction', page: '/invite/[invitation]', roles: EVERYONE },
];

export type DemoIds = Record<
  'stallion' | 'client' | 'collection' | 'read' | 'image' | 'invitation' | 'healthEvent' | 'report' | 'code' | 'mark' | 'user' | 'classSet' | 'otherStallion' | 'otherReport',
  string
>;

/**
 * Demo records for the bracketed names, from the seeded database: the fever stallion (owned by
 * the demo client), its owner's client record, a collection of his with field images and a
 * submitted first read, that read, its first image, his fever (a health event), and the newest current
 * signed report of his (with its PDF stored) and its verification code, a mark of the read, the second
 * technician (a user), the default class set, and the second owner's stallion and signed report (records the first
 * owner must not reach). The invitation is well-formed and matches none, which shows the page's "cannot be used" state.
 */
export async function demoIds(db: Knex): Promise<DemoIds> {
  const stallion = await db('stallions').where({ registration: DEMO_FEVER.stallionRegistration }).first('id', 'client_id');
  const owner = await db('users').where({ email: DEMO_CLIENT_USER_EMAIL }).first('client_id');
  const read = await db('reads as r')
    .join('collections as c', 'c.id', 'r.collection_id')
    .where({ 'c.stallion_id': stallion?.id, 'r.kind': 'first', 'r.status': 'submitted' })
    .orderBy('r.id')
    .first('r.id', 'r.collection_id');
  const image = read && (await db('field_images').where({ collection_id: read.collection_id }).orderBy('position').first('id'));
  const event = await db('health_events').where({ stallion_id: stallion?.id, kind: 'fever', started_on: DEMO_FEVER.date }).first('id');
  const report = await db('report_versions as v')
    .join('collections as c', 'c.id', 'v.collection_id')
    .where('c.stallion_id', stallion?.id)
    .whereNull('v.superseded_by')
    .whereNull('v.amended_at')
    .whereNotNull('v.pdf_sha256')
    .orderBy('v.id', 'desc')
    .first('v.id', 'v.verification_code');
  const mark = read && (await db('marks').where({ read_id: read.id }).orderBy('id').first('id'));
  const user = await db('users').where({ email: 'reader@quillfield.example' }).first('id');
  const classSet = await db('class_sets').orderBy('id').first('id');
  const other = await db('users as u').join('stallions as s', 's.client_id', 'u.client_id').where('u.email', DEMO_OTHER_CLIENT_USER_EMAIL).orderBy('s.id').first('s.id');
  const otherReport = await db('report_versions as v').join('collections as c', 'c.id', 'v.collection_id').where('c.stallion_id', other?.id).orderBy('v.id').first('v.id');
  if (!stallion || !owner?.client_id || !read || !image || !event || !report || !mark || !user || !classSet || !other || !otherReport) throw new Error('The demo records are missing: run the demo seed (npm test does).');
  return {
    stallion: String(stallion.id),
    client: String(owner.client_id),
    collection: String(read.collection_id),
    read: String(read.id),
    image: String(image.id),
    invitation: 'no-such-invitation-0000000000000000',
    healthEvent: String(event.id),
    report: String(report.id),
    code: report.verification_code,
    mark: String(mark.id),
    user: String(user.id),
    classSet: String(classSet.id),
    otherStallion: String(other.id),
    otherReport: String(otherReport.id),
  };
}

/** The path with its bracketed names replaced by demo ids. */
export function fill(path: string, ids: DemoIds): string {
  return path.replace(/\[(\w+)\]/g, (_, name: string) => {
    const id = ids[name as keyof DemoIds];
    if (!id) throw new Error(`No demo id for [${name}] in ${path}`);
    return id;
  });
}

/** Staff pages: the ones no client may see. */
export const staffPages = () => PAGES.filter((p) => !p.roles.includes('client') && !p.roles.includes('anonymous'));
