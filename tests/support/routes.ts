// The app's route files, read from disk: their URL patterns, the methods they export and, for
// handlers made by route() (lib/api/handler.ts), what the wrapper checks (roles, params, query and
// body schemas, on `handler.spec`). The role matrix and the bad-input corpus take their schemas from here,
// so a route is never tested against a copy of its schema.
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import type { RouteSpec } from '../../lib/api/handler';

export const APP_DIR = join(process.cwd(), 'app');

/** Files called `name` under `dir`, recursively. */
export function filesNamed(dir: string, name: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((d) => {
    const p = join(dir, d.name);
    if (d.isDirectory()) return filesNamed(p, name);
    return d.name === name ? [p] : [];
  });
}

/** app/(lab)/stallions/[id]/edit/page.tsx → /stallions/[id]/edit (route groups are not in the URL). */
export function routeOf(file: string): string {
  const parts = relative(APP_DIR, file).split(sep).slice(0, -1).filter((s) => !/^\(.+\)$/.test(s));
  return `/${parts.join('/')}`;
}

/** A file's route as a pattern: [x] is one segment, [...x] the rest. */
export const patternOf = (route: string) => new RegExp(`^${route.replace(/\[\.\.\.\w+\]/g, '.+').replace(/\[\w+\]/g, '[^/]+')}$`);
/** A table path with its bracketed names as one plain segment each, to match against a file's pattern. */
export const sample = (path: string) => path.replace(/\[\w+\]/g, 'x');
/** Whether the table path (e.g. /api/stallions/[stallion]) is the file route (e.g. /api/stallions/[id]). */
export const sameRoute = (fileRoute: string, tablePath: string) => patternOf(fileRoute).test(sample(tablePath));

type Handler = ((...args: never[]) => unknown) & { spec?: RouteSpec };
export type RouteModule = { file: string; route: string; methods: Record<string, Handler> };

let loaded: Promise<RouteModule[]> | undefined;
/** Every app/api route module, imported (server-only is a no-op under the test runners). */
export function routeModules(): Promise<RouteModule[]> {
  loaded ??= Promise.all(
    filesNamed(join(APP_DIR, 'api'), 'route.ts').map(async (file) => {
      const mod = (await import(file)) as Record<string, Handler>;
      const methods = Object.fromEntries(Object.entries(mod).filter(([k, v]) => /^(GET|POST|PUT|PATCH|DELETE)$/.test(k) && typeof v === 'function'));
      return { file: relative(process.cwd(), file).split(sep).join('/'), route: routeOf(file), methods };
    }),
  );
  return loaded;
}

/** The route file behind a table entry (its URL pattern, e.g. /api/reads/[id]/marks/[markId]) and the handler's spec (undefined: not made by route(), i.e. next-auth). */
export async function handlerOf(method: string, tablePath: string): Promise<{ route: string; spec: RouteSpec | undefined }> {
  // Static segments win over dynamic ones (/api/images/[id]/candidates before /api/images/[id]/[variant]), as in Next.
  const dynamic = (r: string) => (r.match(/\[/g) ?? []).length;
  const mod = (await routeModules()).filter((m) => sameRoute(m.route, tablePath) && m.methods[method]).sort((a, b) => dynamic(a.route) - dynamic(b.route))[0];
  if (!mod) throw new Error(`No ${method} handler for ${tablePath}`);
  return { route: mod.route, spec: mod.methods[method]!.spec };
}

export const specOf = async (method: string, tablePath: string) => (await handlerOf(method, tablePath)).spec;

/** A server action's id, from the build's manifest (the browser finds it in the page's script). */
export function actionId(file: string, name: string): string {
  const manifest = JSON.parse(readFileSync(join(process.env.NEXT_DIST_DIR ?? '.next', 'server', 'server-reference-manifest.json'), 'utf8')) as { node: Record<string, { filename: string; exportedName: string }> };
  const found = Object.entries(manifest.node).find(([, a]) => a.filename === file && a.exportedName === name);
  if (!found) throw new Error(`server action ${file}#${name} is not in the build (${process.env.NEXT_DIST_DIR ?? '.next'})`);
  return found[0];
}
