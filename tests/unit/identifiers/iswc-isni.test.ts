import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  computeIsniCheckCharacter,
  computeIswcCheckDigit,
  formatIsni,
  formatIswc,
  isValidIsni,
  isValidIswc,
  parseIsni,
  parseIswc,
} from '@/lib/identifiers';

const digits = (n: number) =>
  fc.array(fc.integer({ min: 0, max: 9 }), { minLength: n, maxLength: n }).map((d) => d.join(''));

function changeOneDigit(code: string, from: number, at: number, delta: number): string {
  const i = from + (at % (code.length - from));
  const char = code[i]!;
  const replacement = char === 'X' ? String(delta % 10) : String((Number(char) + delta) % 10);
  return `${code.slice(0, i)}${replacement}${code.slice(i + 1)}`;
}

describe('ISWC (ISO 15707)', () => {
  // REFERENCES §5 (algorithm from a public ISWC validation module): T-034.524.680-1.
  // By hand: 1 + 1·0 + 2·3 + 3·4 + 4·5 + 5·2 + 6·4 + 7·6 + 8·8 + 9·0 = 179 → (10 − 9) mod 10 = 1.
  it('computes the check digit of T-034.524.680-1', () => {
    expect(1 + 0 + 6 + 12 + 20 + 10 + 24 + 42 + 64 + 0).toBe(179);
    expect(computeIswcCheckDigit('034524680')).toBe(1);
    expect(parseIswc('T-034.524.680-1')).toEqual({
      ok: true,
      value: 'T0345246801',
      workDigits: '034524680',
      checkDigit: 1,
    });
  });

  it.each(['t0345246801', 'ISWC T-034524680-1', 'T 034 524 680 1'])('accepts %j', (input) => {
    expect(isValidIswc(input)).toBe(true);
  });

  it.each([
    ['', 'empty', /empty/],
    ['0345246801', 'prefix', /starts with the letter T/],
    ['T034524680', 'length', /10 digits after the T.*has 9/],
    ['T03452468A1', 'non-digit', /"A"/],
    ['T-034.524.680-2', 'check-digit', /is 2, but .* should be 1/],
  ])('rejects %j with %s', (input, code, message) => {
    const parsed = parseIswc(input);
    expect(parsed).toMatchObject({ ok: false, code });
    if (!parsed.ok) expect(parsed.message).toMatch(message);
  });

  const iswcArb = digits(9).map((w) => `T${w}${computeIswcCheckDigit(w)}`);

  it('round-trips through the display form', () => {
    fc.assert(
      fc.property(iswcArb, (code) => {
        const parsed = parseIswc(formatIswc(code));
        return (
          parsed.ok && parsed.value === code && /^T-\d{3}\.\d{3}\.\d{3}-\d$/.test(formatIswc(code))
        );
      }),
    );
  });

  // The ISWC weights are 1…9 modulo 10, so a change is caught exactly when weight × change
  // is not a multiple of 10: always at weights 1, 3, 7 and 9 and at the check digit itself,
  // but not a change of 5 at weights 2, 4, 6, 8, nor an even change at weight 5.
  it('detects any single-digit change whose weighted difference is not a multiple of 10', () => {
    fc.assert(
      fc.property(iswcArb, fc.nat(), fc.integer({ min: 1, max: 9 }), (code, at, delta) => {
        const position = at % 10;
        const weight = position === 9 ? 1 : position + 1;
        const detected = !parseIswc(changeOneDigit(code, 1, position, delta)).ok;
        return detected === ((weight * delta) % 10 !== 0);
      }),
    );
  });

  it('misses an even change in the fifth work digit, as the algorithm implies', () => {
    expect(isValidIswc('T-034.524.680-1')).toBe(true);
    expect(isValidIswc('T-034.544.680-1')).toBe(true);
  });
});

describe('ISNI (ISO 27729, ISO 7064 MOD 11-2)', () => {
  // REFERENCES §5 (algorithm as in ORCID-style implementations): 0000 0001 2103 2683.
  it('computes the check character of 0000 0001 2103 2683', () => {
    expect(computeIsniCheckCharacter('000000012103268')).toBe('3');
    expect(formatIsni('0000000121032683')).toBe('0000 0001 2103 2683');
    expect(parseIsni('ISNI 0000 0001 2103 2683')).toEqual({
      ok: true,
      value: '0000000121032683',
      checkCharacter: '3',
    });
  });

  it('writes a check value of 10 as X', () => {
    const data = Array.from(
      { length: 1000 },
      (_, n) => `000000012${String(n).padStart(6, '0')}`,
    ).find((d) => computeIsniCheckCharacter(d) === 'X');
    expect(data).toBeDefined();
    expect(isValidIsni(`${data}x`)).toBe(true);
  });

  it.each([
    ['', 'empty', /empty/],
    ['0000 0001 2103 268', 'length', /16 characters; this one has 15/],
    ['0000 000A 2103 2683', 'non-digit', /character 8 is "A"/],
    ['0000 0001 2103 2684', 'check-character', /"4", but the check character .* is "3"/],
  ])('rejects %j with %s', (input, code, message) => {
    const parsed = parseIsni(input);
    expect(parsed).toMatchObject({ ok: false, code });
    if (!parsed.ok) expect(parsed.message).toMatch(message);
  });

  const isniArb = digits(15).map((d) => `${d}${computeIsniCheckCharacter(d)}`);

  it('round-trips through the display form', () => {
    fc.assert(
      fc.property(isniArb, (code) => {
        const parsed = parseIsni(formatIsni(code));
        return parsed.ok && parsed.value === code;
      }),
    );
  });

  it('detects any single-digit change', () => {
    fc.assert(
      fc.property(isniArb, fc.nat(), fc.integer({ min: 1, max: 9 }), (code, at, delta) => {
        return !parseIsni(changeOneDigit(code, 0, at, delta)).ok;
      }),
    );
  });
});
