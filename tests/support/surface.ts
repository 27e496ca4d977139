// The app's whole surface: every page and every GET API route, with the roles that may open it.
// A new page or GET route is added HERE (tests/unit/surface.test.ts fails until it is), and then
// the smoke tests open it for every role: tests/e2e/smoke.spec.ts (each page in the browser, no
// 5xx, no page error, no console error), tests/integration/surface/get-routes.test.ts (each GET
// route as each role: 200 for the roles listed, 401/403 for the others, never a 5xx) and
// tests/integration/surface/staff-pages-rsc.test.ts (no staff page data reaches a client).
//
// Paths name demo records in brackets — [stallion], [collection], [read], [image], [client],
// [invitation], [report], [code] — which demoIds() looks up in the seeded database at test time.
import type { Knex } from 'knex';
import type { Role } from '../../lib/auth/roles';
import { DEMO_CLIENT_USER_EMAIL, DEMO_FEVER } from '../../lib/demo/scenario';

export type Visitor = Role | 'anonymous';
export type Entry = { path: string; roles: readonly Visitor[] };

export const STAFF: readonly Visitor[] = ['technician', 'veterinarian', 'lab_manager'];
export const SIGNED_IN: readonly Visitor[] = [...STAFF, 'client'];
export const EVERYONE: readonly Visitor[] = ['anonymous', ...SIGNED_IN];

export const PAGES: Entry[] = [
  { path: '/sign-in', roles: ['anonymous'] },
  { path: '/invite/[invitation]', roles: ['anonymous'] },
  { path: '/', roles: SIGNED_IN },
  { path: '/help', roles: SIGNED_IN },
  { path: '/no-access', roles: SIGNED_IN },
  { path: '/portal', roles: ['client'] },
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
  { path: '/api/stallions/[stallion]', roles: SIGNED_IN },
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
  { path: '/api/reports/[report]', roles: SIGNED_IN },
  { path: '/api/reports/[report]/pdf', roles: SIGNED_IN },
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

export type DemoIds = Record<'stallion' | 'client' | 'collection' | 'read' | 'image' | 'invitation' | 'healthEvent' | 'report' | 'code', string>;

/**
 * Demo records for the bracketed names, from the seeded database: the fever stallion (owned by
 * the demo client), its owner's client record, a collection of his with field images and a
 * submitted first read, that read, its first image, his fever (a health event), and the newest current
 * signed report of his (with its PDF stored) and its verification code. The invitation is well-formed and
 * matches none, which shows the page's "cannot be used" state.
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
  if (!stallion || !owner?.client_id || !read || !image || !event || !report) throw new Error('The demo records are missing: run the demo seed (npm test does).');
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
