import { z } from 'zod';

// Form inputs arrive as '' or NaN when left empty; both mean "not given".
const empty = (v: unknown) => v === '' || v === null || v === undefined || (typeof v === 'number' && Number.isNaN(v));

export const optionalNumber = (label: string, min: number, max: number, unit = '') =>
  z.preprocess(
    (v) => (empty(v) ? null : typeof v === 'string' ? Number(v.replace(',', '.')) : v),
    z
      .number({ error: `${label} must be a number.` })
      .min(min, `${label} cannot be below ${min}${unit}.`)
      .max(max, `${label} cannot be above ${max}${unit}.`)
      .nullable(),
  );

export const requiredNumber = (label: string, min: number, max: number, unit = '') =>
  z.preprocess(
    (v) => (empty(v) ? undefined : typeof v === 'string' ? Number(v.replace(',', '.')) : v),
    z
      .number({ error: `Enter ${label.toLowerCase()}.` })
      .min(min, `${label} cannot be below ${min}${unit}.`)
      .max(max, `${label} cannot be above ${max}${unit}.`),
  );

export const optionalInt = (label: string, min: number, max: number) =>
  z.preprocess(
    (v) => (empty(v) ? null : typeof v === 'string' ? Number(v) : v),
    z.number({ error: `${label} must be a whole number.` }).int(`${label} must be a whole number.`).min(min, `${label} cannot be below ${min}.`).max(max, `${label} cannot be above ${max}.`).nullable(),
  );

export const optionalText = (label: string, max: number) =>
  z.preprocess((v) => (typeof v === 'string' ? (v.trim() === '' ? null : v.trim()) : v ?? null), z.string().max(max, `${label} is limited to ${max} characters.`).nullable());

export const requiredText = (label: string, max: number) =>
  z.string({ error: `Enter ${label.toLowerCase()}.` }).trim().min(1, `Enter ${label.toLowerCase()}.`).max(max, `${label} is limited to ${max} characters.`);

export const idField = (label: string) =>
  z.preprocess((v) => (empty(v) ? undefined : typeof v === 'string' ? Number(v) : v), z.number({ error: `Choose ${label}.` }).int().positive(`Choose ${label}.`));

/** List queries: server-side paging, sorting and a free-text filter. */
export const listQuery = <S extends readonly [string, ...string[]]>(sortable: S, defaultSort: S[number], defaultDir: 'asc' | 'desc' = 'asc') =>
  z.object({
    page: z.coerce.number().int().min(1).max(100000).default(1),
    pageSize: z.coerce.number().int().min(5).max(100).default(25),
    sort: z.enum(sortable).default(defaultSort as never),
    dir: z.enum(['asc', 'desc']).default(defaultDir),
    q: z.string().trim().max(100).optional(),
  });

export type Page<T> = { rows: T[]; total: number; page: number; pageSize: number };
