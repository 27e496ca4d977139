import { readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { describe, expect, it } from 'vitest';
import { APP_DIR as APP, filesNamed as files, patternOf, routeOf, sample } from '../support/routes';
import { GET_ROUTES, PAGES, SERVER_ACTIONS, SIGNED_IN, WRITE_ROUTES } from '../support/surface';

// tests/support/surface.ts must list every page, GET route and write route the app has, so the smoke
// tests, the role matrix and the bad-input corpus reach all of them; and every page and server action
// must check its own role.

const pageFiles = files(APP, 'page.tsx');
const getRouteFiles = files(join(APP, 'api'), 'route.ts').filter((f) => /export (const GET\b|\{[^}]*\bas GET\b|async function GET\b)|export const GET =/.test(readFileSync(f, 'utf8')));
const WRITE_METHODS = ['POST', 'PUT', 'PATCH', 'DELETE'] as const;
/** Every write method a route file exports: `export const POST = …`, `export async function POST`, `export { x as POST }`. */
const writeMethodsOf = (source: string) => WRITE_METHODS.filter((m) => new RegExp(`export (const ${m}\\b|async function ${m}\\b|function ${m}\\b|\\{[^}]*\\bas ${m}\\b)`).test(source));
const writeRoutes = files(join(APP, 'api'), 'route.ts').flatMap((f) => writeMethodsOf(readFileSync(f, 'utf8')).map((m) => `${m} ${routeOf(f)}`));

describe('the surface list', () => {
  it('has every page, and only pages that exist', () => {
    const routes = pageFiles.map(routeOf);
    for (const r of routes) expect(PAGES.some((p) => patternOf(r).test(sample(p.path))), `page ${r} is missing from tests/support/surface.ts`).toBe(true);
    for (const p of PAGES) expect(routes.some((r) => patternOf(r).test(sample(p.path))), `${p.path} in surface.ts has no page`).toBe(true);
  });

  it('has every GET route, and only routes that exist', () => {
    const routes = getRouteFiles.map(routeOf);
    for (const r of routes) expect(GET_ROUTES.some((p) => patternOf(r).test(sample(p.path))), `GET ${r} is missing from tests/support/surface.ts`).toBe(true);
    for (const p of GET_ROUTES) expect(routes.some((r) => patternOf(r).test(sample(p.path))), `${p.path} in surface.ts has no GET route`).toBe(true);
  });

  it('has every write route (POST, PUT, PATCH, DELETE), and only routes that exist', () => {
    expect(writeRoutes.length).toBeGreaterThan(20);
    const listed = (m: string, r: string) => WRITE_ROUTES.some((w) => w.method === m && patternOf(r).test(sample(w.path)));
    for (const wr of writeRoutes) {
      const [m, r] = wr.split(' ') as [string, string];
      expect(listed(m, r), `${wr} is missing from WRITE_ROUTES in tests/support/surface.ts`).toBe(true);
    }
    for (const w of WRITE_ROUTES) {
      expect(writeRoutes.some((wr) => { const [m, r] = wr.split(' ') as [string, string]; return m === w.method && patternOf(r).test(sample(w.path)); }), `${w.method} ${w.path} in surface.ts has no route`).toBe(true);
    }
  });

  it('every route handler goes through route() (so its roles and schemas are checked, and read by the corpus), or is next-auth', () => {
    for (const f of files(join(APP, 'api'), 'route.ts')) {
      const source = readFileSync(f, 'utf8');
      const rel = relative(process.cwd(), f).split(sep).join('/');
      if (rel === 'app/api/auth/[...nextauth]/route.ts' || rel === 'app/api/health/route.ts') continue;
      for (const m of [...WRITE_METHODS, 'GET']) {
        if (new RegExp(`export (async )?function ${m}\\b`).test(source)) throw new Error(`${rel}: ${m} is a bare function; wrap it in route() from lib/api/handler.ts`);
        if (new RegExp(`export const ${m}\\b`).test(source)) expect(source, `${rel} ${m}`).toMatch(new RegExp(`export const ${m} = route\\(`));
      }
    }
  });
});

describe('role checks', () => {
  it('every page that needs a session checks the role itself, not only its layout', () => {
    for (const file of pageFiles) {
      const entry = PAGES.find((p) => patternOf(routeOf(file)).test(sample(p.path)))!;
      if (entry.roles.includes('anonymous')) continue;
      const source = readFileSync(file, 'utf8');
      const rel = relative(process.cwd(), file);
      // A page for some roles only names them; one for every signed-in role may call it bare.
      const forEveryone = SIGNED_IN.every((r) => entry.roles.includes(r));
      expect(source, rel).toMatch(forEveryone ? /requirePageUser\(/ : /requirePageUser\(\s*[^)\s]/);
    }
  });

  it('SERVER_ACTIONS lists every server action, and only those that exist', () => {
    const sources = [...files(APP, 'actions.ts'), ...files(join(process.cwd(), 'lib'), 'actions.ts')].filter((f) => /^['"]use server['"]/m.test(readFileSync(f, 'utf8')));
    const found = sources.flatMap((f) => [...readFileSync(f, 'utf8').matchAll(/export async function (\w+)/g)].map((m) => `${relative(process.cwd(), f).split(sep).join('/')}#${m[1]}`));
    expect(found.sort()).toEqual(SERVER_ACTIONS.map((a) => `${a.file}#${a.name}`).sort());
  });

  it('every server action checks the role, or is one of the public ones that check a token', () => {
    const PUBLIC_ACTIONS = ['app/invite/[token]/actions.ts'];
    const actionFiles = [...files(APP, 'actions.ts'), ...files(join(process.cwd(), 'lib'), 'actions.ts')].filter((f) => /^['"]use server['"]/m.test(readFileSync(f, 'utf8')));
    expect(actionFiles.length).toBeGreaterThan(0);
    for (const f of actionFiles) {
      const rel = relative(process.cwd(), f).split(sep).join('/');
      if (PUBLIC_ACTIONS.includes(rel)) continue;
      expect(readFileSync(f, 'utf8'), rel).toMatch(/requirePageUser\(/);
    }
  });
});
