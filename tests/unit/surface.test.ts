import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { describe, expect, it } from 'vitest';
import { GET_ROUTES, PAGES, SIGNED_IN } from '../support/surface';

// tests/support/surface.ts must list every page and GET route the app has, so the smoke tests
// open all of them; and every page and server action must check its own role.
const APP = join(process.cwd(), 'app');

function files(dir: string, name: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((d) => {
    const p = join(dir, d.name);
    if (d.isDirectory()) return files(p, name);
    return d.name === name ? [p] : [];
  });
}

/** app/(lab)/stallions/[id]/edit/page.tsx → /stallions/[id]/edit (route groups are not in the URL). */
function routeOf(file: string): string {
  const parts = relative(APP, file).split(sep).slice(0, -1).filter((s) => !/^\(.+\)$/.test(s));
  return `/${parts.join('/')}`;
}

/** A file's route as a pattern: [x] is one segment, [...x] the rest. */
const patternOf = (route: string) => new RegExp(`^${route.replace(/\[\.\.\.\w+\]/g, '.+').replace(/\[\w+\]/g, '[^/]+')}$`);
const sample = (path: string) => path.replace(/\[\w+\]/g, 'x');

const pageFiles = files(APP, 'page.tsx');
const getRouteFiles = files(join(APP, 'api'), 'route.ts').filter((f) => /export (const GET\b|\{[^}]*\bas GET\b|async function GET\b)|export const GET =/.test(readFileSync(f, 'utf8')));

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
