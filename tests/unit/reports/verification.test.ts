import { describe, expect, it } from 'vitest';
import {
  CODE_ALPHABET,
  CODE_RANDOM_BITS,
  CODE_SYMBOLS,
  isCanonicalVerificationCode,
  luhnCheckValue,
  luhnValid,
  newVerificationCode,
  normaliseVerificationCode,
  parseVerificationCode,
  verificationUrl,
} from '@/lib/reports/verification';

const digits = (s: string) => [...s].map(Number);
const values = (code: string) => [...code.replace(/-/g, '')].map((c) => CODE_ALPHABET.indexOf(c));
const fromValues = (vs: number[]) => {
  const s = vs.map((v) => CODE_ALPHABET[v]).join('');
  return s.match(/.{4}/g)!.join('-');
};

describe('Luhn mod N check', () => {
  it('gives the decimal Luhn check digit of the usual worked example', () => {
    // 7992739871 → check digit 3, i.e. 79927398713 (the standard example for Luhn's algorithm,
    // US patent 2,950,048, 1960; numbers from memory).
    expect(luhnCheckValue(digits('7992739871'), 10)).toBe(3);
    expect(luhnValid(digits('79927398713'), 10)).toBe(true);
    expect(luhnValid(digits('79927398710'), 10)).toBe(false);
  });

  it('catches every single mistyped symbol of a code', () => {
    const code = newVerificationCode();
    const vs = values(code);
    for (let i = 0; i < vs.length; i++) {
      for (let v = 0; v < 32; v++) {
        if (v === vs[i]) continue;
        const typo = [...vs];
        typo[i] = v;
        expect(luhnValid(typo, 32)).toBe(false);
      }
    }
  });

  it('catches every swap of two neighbouring symbols except 0 ↔ Z', () => {
    // Worked out from the algorithm: a swap of a and b goes unseen only when a − b ≡ ±1 across
    // the doubling's wrap, which for N = 32 is the single pair (0, 31).
    for (let a = 0; a < 32; a++) {
      for (let b = 0; b < 32; b++) {
        if (a === b) continue;
        const body = [5, 9, a, b, 17];
        const intact = [...body, luhnCheckValue(body, 32)];
        const swapped = [5, 9, b, a, 17, intact[5]!];
        const pair = [a, b].sort((x, y) => x - y).join();
        expect(luhnValid(swapped, 32)).toBe(pair === '0,31');
      }
    }
  });
});

describe('verification codes', () => {
  it('carry at least 80 random bits, in five groups of four', () => {
    expect(CODE_RANDOM_BITS).toBeGreaterThanOrEqual(80);
    expect(CODE_SYMBOLS).toBe(20);
    const code = newVerificationCode();
    expect(code).toMatch(/^[0-9A-HJKMNP-TV-Z]{4}(-[0-9A-HJKMNP-TV-Z]{4}){4}$/);
    expect(isCanonicalVerificationCode(code)).toBe(true);
  });

  it('draw every symbol about equally often, and never repeat', () => {
    const codes = Array.from({ length: 2000 }, () => newVerificationCode());
    expect(new Set(codes).size).toBe(codes.length);
    // 2000 codes × 19 random symbols = 38,000 draws, 1,187.5 per symbol expected (sd ≈ 34):
    // ±20 % is more than 7 sd, so only a broken generator fails this.
    const counts = new Map<string, number>();
    for (const c of codes) for (const ch of c.replace(/-/g, '').slice(0, 19)) counts.set(ch, (counts.get(ch) ?? 0) + 1);
    expect(counts.size).toBe(32);
    for (const n of counts.values()) {
      expect(n).toBeGreaterThan(1187.5 * 0.8);
      expect(n).toBeLessThan(1187.5 * 1.2);
    }
  });

  it('refuse a random source that leaves the alphabet', () => {
    expect(() => newVerificationCode(() => 32)).toThrow(RangeError);
    expect(() => newVerificationCode(() => 0.5)).toThrow(RangeError);
  });

  it('read back however a person types them', () => {
    // A code with 0s and 1s in it, so the confusable letters can stand in for them.
    const body = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 1, 0, 31, 30, 29];
    const canonical = fromValues([...body, luhnCheckValue(body, 32)]);
    expect(normaliseVerificationCode(canonical)).toBe(canonical);
    expect(normaliseVerificationCode(canonical.toLowerCase())).toBe(canonical);
    expect(normaliseVerificationCode(canonical.replace(/-/g, ''))).toBe(canonical);
    expect(normaliseVerificationCode(`  ${canonical.replace(/-/g, ' ')}  `)).toBe(canonical);
    expect(normaliseVerificationCode(canonical.replace(/-/g, '–'))).toBe(canonical); // en dash
    // O for 0, I and L for 1 (Crockford's decoding rules).
    const confusable = canonical.replace(/0/g, 'O').replace(/1/, 'I').replace(/1/, 'l');
    expect(confusable).not.toBe(canonical);
    expect(normaliseVerificationCode(confusable)).toBe(canonical);
    // Full-width letters from some keyboards fold to ASCII.
    const fullWidth = [...canonical].map((c) => (c === '-' ? c : String.fromCodePoint(c.codePointAt(0)! + 0xfee0))).join('');
    expect(normaliseVerificationCode(fullWidth)).toBe(canonical);
  });

  it('say what is wrong with a code that is not one', () => {
    const code = newVerificationCode();
    expect(parseVerificationCode('')).toMatchObject({ ok: false, problem: 'empty' });
    expect(parseVerificationCode(`${code.slice(0, -1)}U`)).toMatchObject({ ok: false, problem: 'character' });
    expect(parseVerificationCode(code.slice(0, -2))).toMatchObject({ ok: false, problem: 'length' });
    expect(parseVerificationCode(`${code}0`)).toMatchObject({ ok: false, problem: 'length' });
    const vs = values(code);
    vs[3] = (vs[3]! + 1) % 32;
    expect(parseVerificationCode(fromValues(vs))).toMatchObject({ ok: false, problem: 'check' });
    expect(isCanonicalVerificationCode(code.toLowerCase())).toBe(false);
    expect(isCanonicalVerificationCode(code.replace(/-/g, ''))).toBe(false);
  });

  it('make the public page address', () => {
    expect(verificationUrl('https://lab.example/', 'ABCD-EFGH-JKMN-PQRS-TVWX')).toBe('https://lab.example/verify/ABCD-EFGH-JKMN-PQRS-TVWX');
    expect(verificationUrl('http://localhost:3000', 'X')).toBe('http://localhost:3000/verify/X');
  });
});

describe('the verification code route parameter', () => {
  it('hands on the canonical code, or a message a person can act on', async () => {
    const { verificationCodeParams } = await import('@/lib/validations/report');
    const code = newVerificationCode();
    expect(verificationCodeParams.parse({ code: code.toLowerCase().replace(/-/g, '') })).toEqual({ code });
    expect(verificationCodeParams.parse({ code: encodeURIComponent(code.replace(/-/g, ' ')) })).toEqual({ code });
    const bad = verificationCodeParams.safeParse({ code: 'ABCD' });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.message).toMatch(/20 characters/);
    expect(verificationCodeParams.safeParse({ code: 'x'.repeat(65) }).success).toBe(false);
    expect(verificationCodeParams.safeParse({ code: '%E0%A4%A' }).error?.issues[0]?.message).toMatch(/only the digits/);
  });
});
