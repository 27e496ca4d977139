// The bad-input corpus: malformed requests made from a route's own schemas (tests/support/routes.ts)
// and a valid example (tests/support/surface.ts). Pure: it only describes requests; the test in
// tests/integration/security/bad-input.test.ts sends them.
//
// The schema is the oracle. Every request it makes is one the app must refuse: a body, query or
// id the route's own zod schema rejects (checked here, before sending), a body that is not JSON or
// not sent as JSON, one past the size limit, or — for a body the schema would accept (an extra
// field, an injection string in a free-text field) — a record that does not exist. Requests
// the schema would accept at a real record are never made, so nothing can change.
import type { z } from 'zod';

type Schema = z.ZodType;
export type BadRequest = {
  /** What kind of malformation, for the per-route count. */
  kind: string;
  method: string;
  path: string;
  headers: Record<string, string>;
  body?: string | Uint8Array;
  /** '4xx': must be refused; 'no5xx': a GET whose query the schema accepts (a 200 is right). */
  expect: '4xx' | 'no5xx';
};

/** A number the id schemas take but no record has. */
export const UNKNOWN_ID = '2147480011';
export const UNKNOWN_UUID = '7f0e6d5c-4b3a-4291-8f7e-6d5c4b3a2918';

export const INJECTIONS = [
  "' OR '1'='1",
  '1; DROP TABLE users; --',
  "1' UNION SELECT password_hash FROM users --",
  '<script>alert(1)</script>',
  '"><img src=x onerror=alert(1)>',
  '../../../../etc/passwd',
  '..\\..\\..\\windows\\win.ini',
  '%2e%2e%2f%2e%2e%2fetc%2fpasswd',
  '\u0000',
  '${7*7}{{7*7}}',
  '__proto__',
  '\u202e\u0007\ud83d\ude00',
];

/** JSON values of the wrong type, out of range, or absurd, for any field. */
export const BAD_VALUES: unknown[] = [
  null,
  true,
  false,
  0,
  -1,
  -1e308,
  1e308,
  2 ** 53 + 1,
  0.5,
  '',
  '   ',
  'NaN',
  'Infinity',
  '-1',
  'x'.repeat(20_000),
  [],
  [1, 'a', null],
  {},
  { $gt: '' },
  ...INJECTIONS,
];

/** Raw JSON text for values JSON cannot carry: NaN (not JSON at all) and ±Infinity (1e999 parses to it). */
export const RAW_VALUES = ['NaN', 'Infinity', '1e999', '-1e999', '-0', '0x10', 'undefined', '"\\ud800"'];

export const BAD_IDS = ['0', '-1', '1.5', 'abc', '9'.repeat(40), 'NaN', 'Infinity', "1' OR '1'='1", '..%2F..%2Fetc%2Fpasswd', '%00', '%3Cscript%3E', ' 1'];

export const BAD_QUERY_VALUES = ['', 'abc', '-1', '0', '1e309', 'NaN', 'Infinity', '-Infinity', 'x'.repeat(5000), "' OR 1=1 --", '<script>alert(1)</script>', '../../etc/passwd', '%00'];

export const MALFORMED_JSON: (string | Uint8Array)[] = [
  '{',
  '{"a":}',
  "{'a': 1}",
  '{"a": 1,}',
  '[1, 2',
  'undefined',
  'NaN',
  '\ufeff{', // a byte-order mark is dropped by the decoder: this one is broken after it
  new Uint8Array([0x7b, 0x22, 0xff, 0xfe, 0x22, 0x3a, 0x31, 0x7d]), // {"\xff\xfe":1}: not UTF-8
  '',
  '{"a": 1} {"b": 2}',
];

export const WRONG_CONTENT_TYPES = ['text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=x', 'application/xml', 'application/jsonp', ''];

/** File names that try to leave their folder or smuggle something in. */
export const PATH_LIKE_NAMES = ['../../etc/passwd.png', '..\\..\\boot.ini.png', '/etc/shadow.png', 'C:\\Windows\\x.png', 'a/b/../../../c.png', '%2e%2e%2fx.png', 'x\u0000.png', '<script>alert(1)</script>.png', 'con.png', '.htaccess', ' ', 'x'.repeat(301) + '.png'];

/** The keys of an object schema, through refinements, pipes and intersections. */
export function shapeKeys(schema: Schema | undefined): string[] {
  if (!schema) return [];
  const s = schema as unknown as { shape?: Record<string, unknown>; _zod?: { def?: Record<string, unknown> } };
  if (s.shape) return Object.keys(s.shape);
  const def = s._zod?.def ?? {};
  if (def.type === 'pipe') return shapeKeys(def.in as Schema);
  if (def.type === 'intersection') return [...new Set([...shapeKeys(def.left as Schema), ...shapeKeys(def.right as Schema)])];
  if (def.innerType) return shapeKeys(def.innerType as Schema);
  return [];
}

const accepts = (schema: Schema | undefined, value: unknown) => !schema || schema.safeParse(value).success;
const json = { 'content-type': 'application/json' };

/** Every path a bracketed name can take: the real record, one that does not exist, and malformed ids. */
function withParam(path: string, name: string, value: string): string {
  return path.replace(`[${name}]`, value);
}

export type RouteInput = {
  method: string;
  /** The table path with brackets, e.g. /api/reads/[read]/marks/[mark]. */
  path: string;
  /** The route file's pattern, e.g. /api/reads/[id]/marks/[markId] (its names are the params the route sees). */
  fileRoute: string;
  /** Bracketed names replaced by real demo records. */
  fill: (path: string) => string;
  params?: Schema;
  query?: Schema;
  body?: Schema;
  example?: unknown;
  exampleQuery?: Record<string, string>;
  /** Never send bodies the schema accepts (see WriteEntry.noValidBodies). */
  noValidBodies?: boolean;
  jsonLimitBytes: number;
};

/** The bracketed names of a table path, in order. */
export const bracketsOf = (path: string) => [...path.matchAll(/\[(\w+)\]/g)].map((m) => m[1]!);

/** The unknown record for a bracketed name: a uuid for marks, a number otherwise. */
const unknownFor = (name: string) => (name === 'mark' ? UNKNOWN_UUID : UNKNOWN_ID);

/** The route's path with every bracket set to a record that does not exist. */
export function unknownPath(path: string): string {
  return bracketsOf(path).reduce((p, b) => withParam(p, b, unknownFor(b)), path);
}

/** The params object the route sees for a filled path: the file's dynamic segments, decoded as Next does. */
function paramsFor(route: RouteInput, filled: string): Record<string, string> {
  const names = bracketsOf(route.fileRoute);
  const m = filled.split('?')[0]!.match(new RegExp(`^${route.fileRoute.replace(/\[\w+\]/g, '([^/]+)')}$`));
  const out: Record<string, string> = {};
  names.forEach((name, i) => {
    const raw = m?.[i + 1] ?? '';
    try {
      out[name] = decodeURIComponent(raw);
    } catch {
      out[name] = raw;
    }
  });
  return out;
}

const queryString = (q: Record<string, string>) => {
  const s = new URLSearchParams(q).toString();
  return s ? `?${s}` : '';
};

/** Sets `key` of a JSON text's top-level object to raw JSON text (NaN, 1e999 …). */
function withRawValue(example: Record<string, unknown>, key: string, raw: string): string {
  const marker = '"__raw_value_marker__"';
  return JSON.stringify({ ...example, [key]: '__raw_value_marker__' }).replace(marker, raw);
}

/**
 * The corpus for one route. A write route gets malformed ids, bodies, JSON, content types, an
 * oversize body and (uploads) path-like file names; a GET route malformed ids and queries.
 */
export function corpusFor(route: RouteInput): BadRequest[] {
  const out: BadRequest[] = [];
  const isWrite = route.method !== 'GET';
  const realPath = route.fill(route.path);
  const brackets = bracketsOf(route.path);
  const exampleQs = queryString(route.exampleQuery ?? {});
  const exampleBody = route.body && route.example !== undefined ? JSON.stringify(route.example) : undefined;
  const bodyOf = (text: string | undefined) => (route.body ? { headers: json, body: text ?? '{}' } : { headers: {} as Record<string, string>, body: undefined });
  const push = (r: Omit<BadRequest, 'method'>) => out.push({ method: route.method, ...r });

  // Ids: each bracket malformed in turn (the others real); the schema must refuse it.
  for (const b of brackets) {
    for (const bad of BAD_IDS) {
      const p = withParam(route.path, b, bad);
      const filled = route.fill(p);
      if (accepts(route.params, paramsFor(route, filled))) continue;
      push({ kind: 'malformed id', path: filled + exampleQs, ...bodyOf(exampleBody), expect: '4xx' });
    }
  }
  // An unknown record, with the valid example: refused as not found (or a state conflict), nothing made.
  if (brackets.length && (isWrite ? !route.noValidBodies : true)) {
    push({ kind: 'unknown id', path: unknownPath(route.path) + exampleQs, ...bodyOf(exampleBody), expect: '4xx' });
  }

  // Query values: each key of the query schema set to bad values.
  for (const key of shapeKeys(route.query)) {
    for (const bad of BAD_QUERY_VALUES) {
      const q = { ...(route.exampleQuery ?? {}), [key]: bad };
      const ok = accepts(route.query, q);
      if (ok && isWrite) continue; // a write with a good query would run
      push({ kind: 'query value', path: realPath + queryString(q), ...bodyOf(exampleBody), expect: ok ? 'no5xx' : '4xx' });
    }
  }
  if (route.query && isWrite && route.exampleQuery) {
    for (const key of Object.keys(route.exampleQuery)) {
      const q = { ...route.exampleQuery };
      delete q[key];
      if (!accepts(route.query, q)) push({ kind: 'query missing field', path: realPath + queryString(q), ...bodyOf(exampleBody), expect: '4xx' });
    }
  }

  if (!isWrite || !route.body) return out;

  // Bodies: the example broken one field at a time; a body the schema still accepts goes to an unknown record.
  const example = (route.example ?? {}) as Record<string, unknown>;
  const keys = [...new Set([...Object.keys(example), ...shapeKeys(route.body)])];
  const sendBody = (kind: string, value: unknown) => {
    const valid = accepts(route.body, value);
    if (valid && (route.noValidBodies || !brackets.length)) return;
    push({ kind, path: (valid ? unknownPath(route.path) : realPath) + exampleQs, headers: json, body: JSON.stringify(value), expect: '4xx' });
  };
  for (const key of keys) {
    const missing = { ...example };
    delete missing[key];
    sendBody('missing field', missing);
    for (const bad of BAD_VALUES) sendBody(typeof bad === 'string' && INJECTIONS.includes(bad) ? 'injection string' : 'wrong type or range', { ...example, [key]: bad });
    for (const raw of RAW_VALUES) {
      const text = withRawValue(example, key, raw);
      let parsed: unknown;
      try {
        parsed = JSON.parse(text);
      } catch {
        push({ kind: 'NaN / Infinity', path: realPath + exampleQs, headers: json, body: text, expect: '4xx' });
        continue;
      }
      const valid = accepts(route.body, parsed);
      if (valid && (route.noValidBodies || !brackets.length)) continue;
      push({ kind: 'NaN / Infinity', path: (valid ? unknownPath(route.path) : realPath) + exampleQs, headers: json, body: text, expect: '4xx' });
    }
    // Arrays of objects (sync changes, class-set classes): break the first element's fields too.
    const first = Array.isArray(example[key]) ? (example[key] as unknown[])[0] : undefined;
    if (first && typeof first === 'object') {
      for (const inner of Object.keys(first as object)) {
        for (const bad of [null, -1, 'x'.repeat(500), {}, [], 1e308, ...INJECTIONS.slice(0, 4)]) {
          sendBody('nested field', { ...example, [key]: [{ ...(first as object), [inner]: bad }, ...(example[key] as unknown[]).slice(1)] });
        }
      }
    }
  }
  // Extra fields: mass assignment, prototype pollution.
  for (const extra of ['{"__proto__": {"role": "lab_manager"}}', '{"constructor": {"prototype": {"admin": true}}}', '{"id": 1}', '{"role": "lab_manager", "createdBy": 1, "signedReportId": 1}', '{"userId": 1, "clientId": 1}']) {
    const text = JSON.stringify(example).replace(/}$/, `, ${extra.slice(1, -1)}}`).replace('{, ', '{');
    const valid = accepts(route.body, JSON.parse(text));
    if (valid && (route.noValidBodies || !brackets.length)) continue;
    push({ kind: 'extra field', path: (valid ? unknownPath(route.path) : realPath) + exampleQs, headers: json, body: text, expect: '4xx' });
  }
  // Whole bodies of the wrong shape.
  for (const whole of [null, [], [route.example], 'a string', 42, true, {}, JSON.parse('['.repeat(2000) + ']'.repeat(2000))]) sendBody('wrong body type', whole);
  // Not JSON at all, or not sent as JSON, or too large.
  for (const text of MALFORMED_JSON) push({ kind: 'malformed JSON', path: realPath + exampleQs, headers: json, body: text, expect: '4xx' });
  // Bytes, not a string: fetch would label a string text/plain itself.
  const bytes = new TextEncoder().encode(exampleBody ?? '{}');
  for (const type of WRONG_CONTENT_TYPES) push({ kind: 'wrong content type', path: realPath + exampleQs, headers: type ? { 'content-type': type } : {}, body: bytes, expect: '4xx' });
  push({ kind: 'oversize body', path: realPath + exampleQs, headers: json, body: `{"x":"${'a'.repeat(route.jsonLimitBytes + 1024)}"}`, expect: '4xx' });
  return out;
}

/**
 * An upload route's corpus (the raw file as the body, its name and scale in the query): path-like
 * file names, files that are not images, an empty and an oversize file — and a real image sent to a
 * collection whose signed report locks it (`lockedCollectionPath`, the route's path for one) and to one
 * that does not exist, which must leave nothing in the database or the object store.
 */
export function uploadCorpusFor(route: RouteInput, image: Uint8Array, maxBytes: number, lockedCollectionPath: string | null): BadRequest[] {
  const out: BadRequest[] = [];
  // A real image only ever goes where it must be refused: a locked collection, or none at all.
  const locked = lockedCollectionPath ?? unknownPath(route.path);
  const q = route.exampleQuery ?? {};
  const push = (kind: string, path: string, body: Uint8Array, name: string) =>
    out.push({ kind, method: route.method, path: `${path}${queryString({ ...q, name })}`, headers: { 'content-type': 'application/octet-stream' }, body, expect: '4xx' });
  const text = new TextEncoder().encode('this is not an image');
  const fakePng = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0]);
  for (const name of PATH_LIKE_NAMES) {
    push('path-like file name', locked, image, name);
    push('path-like file name', locked, text, name);
  }
  for (const name of INJECTIONS.slice(0, 6)) push('injection file name', unknownPath(route.path), image, `${name}.png`);
  push('not an image', locked, text, 'field.png');
  push('truncated image', locked, fakePng, 'field.png');
  push('truncated image', locked, image.slice(0, Math.floor(image.length / 2)), 'field.png');
  push('empty file', locked, new Uint8Array(0), 'field.png');
  push('oversize file', locked, new Uint8Array(maxBytes + 1024), 'big.png');
  push('signed collection', locked, image, 'field.png');
  push('unknown id', unknownPath(route.path), image, 'field.png');
  return out;
}
