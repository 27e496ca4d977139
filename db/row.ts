/**
 * A row as Knex returns it. Knex does not know our columns' types, so each db/queries module maps
 * its rows to typed values in one function (`toCollection`, `toMark` …) and nowhere else.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- Knex rows are untyped; the to<Thing>() mappers give them types.
export type Row = Record<string, any>;

/** A JSON column: mysql2 hands MariaDB's JSON (a LONGTEXT) back as a string. */
export const json = <T,>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;
