/**
 * Verification codes printed on every signed report (as text and as a QR code) and typed into
 * /verify/{code} by anyone holding the paper.
 *
 * Form: 19 random symbols of Crockford's base32 alphabet (Crockford, "Base 32", 2002: digits and
 * capitals without I, L, O, U) = 95 random bits, plus one check symbol (the Luhn mod N algorithm
 * with N = 32), shown in five groups of four: `7K3M-Q9TX-2HDR-W5NB-E8FC`.
 * - 95 bits: far past guessing, even against a rate-limited page asked millions of times.
 * - The check symbol catches every single mistyped symbol and most swapped neighbours before the
 *   database is asked, so a typo says "check the code" instead of "no such report".
 * - Reading is forgiving: case, spaces, dashes and the confusable letters O (→ 0) and I, L (→ 1)
 *   do not matter; U never occurs, so a U is a typo.
 * The canonical form (with dashes) is what is stored, printed and put in the URL.
 */
import { randomInt } from 'node:crypto';

export const CODE_ALPHABET = '0123456789ABCDEFGHJKMNPQRSTVWXYZ';
const BASE = CODE_ALPHABET.length; // 32
/** Random symbols per code (the check symbol comes on top). */
export const CODE_RANDOM_SYMBOLS = 19;
/** Random bits per code: 19 × log2(32). */
export const CODE_RANDOM_BITS = CODE_RANDOM_SYMBOLS * Math.log2(BASE);
export const CODE_SYMBOLS = CODE_RANDOM_SYMBOLS + 1;
const GROUP = 4;
/** The canonical form: five groups of four symbols, e.g. 7K3M-Q9TX-2HDR-W5NB-E8FC. */
export const CANONICAL_CODE = /^[0-9A-HJKMNP-TV-Z]{4}(?:-[0-9A-HJKMNP-TV-Z]{4}){4}$/;

const VALUE = new Map<string, number>([...CODE_ALPHABET].map((c, i) => [c, i]));
// Crockford's decoding rules for letters people confuse with digits.
const CONFUSABLE: Record<string, string> = { O: '0', I: '1', L: '1' };

/**
 * Luhn mod N check value for `values` (each 0 … n − 1): the value that, appended, makes the
 * whole sequence pass. Generic in n so the test can check it against the decimal Luhn examples.
 */
export function luhnCheckValue(values: readonly number[], n: number): number {
  let factor = 2;
  let sum = 0;
  for (let i = values.length - 1; i >= 0; i--) {
    const product = factor * values[i]!;
    sum += Math.floor(product / n) + (product % n);
    factor = factor === 2 ? 1 : 2;
  }
  return (n - (sum % n)) % n;
}

/** Whether a sequence that ends in its Luhn mod N check value is intact. */
export function luhnValid(values: readonly number[], n: number): boolean {
  if (values.length < 2) return false;
  return luhnCheckValue(values.slice(0, -1), n) === values[values.length - 1];
}

function format(symbols: string): string {
  const groups: string[] = [];
  for (let i = 0; i < symbols.length; i += GROUP) groups.push(symbols.slice(i, i + GROUP));
  return groups.join('-');
}

/**
 * A new code from the operating system's cryptographic random source. `pick` is for tests only
 * (it must return a whole number in [0, 32)).
 */
export function newVerificationCode(pick: (max: number) => number = (max) => randomInt(max)): string {
  const values: number[] = [];
  for (let i = 0; i < CODE_RANDOM_SYMBOLS; i++) {
    const v = pick(BASE);
    if (!Number.isInteger(v) || v < 0 || v >= BASE) throw new RangeError('random symbol out of range');
    values.push(v);
  }
  values.push(luhnCheckValue(values, BASE));
  return format(values.map((v) => CODE_ALPHABET[v]).join(''));
}

export type CodeProblem = 'empty' | 'character' | 'length' | 'check';

export type ParsedCode = { ok: true; code: string } | { ok: false; problem: CodeProblem; message: string };

const MESSAGES: Record<CodeProblem, string> = {
  empty: 'Enter the verification code printed on the report.',
  character: 'A verification code has only the digits 0–9 and the letters A–Z except I, L, O and U. Check the code on the report.',
  length: `A verification code has ${CODE_SYMBOLS} characters (five groups of four). Check the code on the report.`,
  check: 'This code has a typing mistake (its check character does not match). Check the code on the report.',
};

/**
 * Reads a code as a person may type or paste it: any case, with or without dashes or spaces, O
 * for 0, I or L for 1. Returns the canonical form or what is wrong with it.
 */
export function parseVerificationCode(input: string): ParsedCode {
  const fail = (problem: CodeProblem): ParsedCode => ({ ok: false, problem, message: MESSAGES[problem] });
  // NFKC folds full-width forms (from some keyboards) to ASCII; dashes of every kind separate groups.
  const compact = input.normalize('NFKC').toUpperCase().replace(/[\s\-‐-―−_.·]+/g, '');
  if (compact === '') return fail('empty');
  let symbols = '';
  for (const ch of compact) {
    const c = CONFUSABLE[ch] ?? ch;
    if (!VALUE.has(c)) return fail('character');
    symbols += c;
  }
  if (symbols.length !== CODE_SYMBOLS) return fail('length');
  if (!luhnValid([...symbols].map((c) => VALUE.get(c)!), BASE)) return fail('check');
  return { ok: true, code: format(symbols) };
}

/** The canonical form, or null when the input is not a valid code. */
export function normaliseVerificationCode(input: string): string | null {
  const parsed = parseVerificationCode(input);
  return parsed.ok ? parsed.code : null;
}

/** True only for a code already in canonical form with a matching check symbol. */
export function isCanonicalVerificationCode(code: string): boolean {
  return CANONICAL_CODE.test(code) && normaliseVerificationCode(code) === code;
}

/** The public page for a code: `${appUrl}/verify/{code}` (one slash, whatever APP_URL ends with). */
export function verificationUrl(appUrl: string, code: string): string {
  return `${appUrl.replace(/\/+$/, '')}/verify/${encodeURIComponent(code)}`;
}
