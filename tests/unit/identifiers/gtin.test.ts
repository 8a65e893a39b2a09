import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  appendGtinCheckDigit,
  computeGtinCheckDigit,
  convertEan13ToUpc,
  convertUpcToEan13,
  isValidUpcEan,
  normalizeGtin,
  parseGtin,
  parseUpcEan,
  toEan13,
} from '@/lib/identifiers';

describe('computeGtinCheckDigit', () => {
  it.each([
    // GS1 India "How to calculate the Check Digit" (gs1india.org): 890400021003 → 7.
    ['890400021003', 7],
    // GS1 Sweden "Så beräknas kontrollsiffran" (gs1.se): 730001100001 → 7.
    ['730001100001', 7],
    // REFERENCES §5, method of GS1 "How to calculate a check digit manually"; recomputed below.
    ['629104150021', 3],
    ['03600029145', 2],
  ])('GS1 worked example %s → %i', (data, check) => {
    expect(computeGtinCheckDigit(data)).toBe(check);
  });

  it('agrees with the GS1 arithmetic written out by hand for 03600029145', () => {
    // Rightmost data digit weighted 3: (5+1+2+0+6+0)·3 + (4+9+0+0+3) = 42 + 16 = 58 → 2.
    const sum = (5 + 1 + 2 + 0 + 6 + 0) * 3 + (4 + 9 + 0 + 0 + 3);
    expect((10 - (sum % 10)) % 10).toBe(computeGtinCheckDigit('03600029145'));
  });

  it('refuses non-digits', () => {
    expect(() => computeGtinCheckDigit('12a')).toThrow();
  });
});

describe('parseUpcEan', () => {
  it.each(['036000291452', '6291041500213', '8904000210037', '7300011000017', '0 36000 29145 2'])(
    'accepts %s',
    (code) => {
      expect(isValidUpcEan(code)).toBe(true);
    },
  );

  it('reads the parts of a UPC-A', () => {
    expect(parseUpcEan('036000-291452')).toEqual({
      ok: true,
      value: '036000291452',
      length: 12,
      kind: 'upc-a',
      checkDigit: 2,
    });
  });

  it.each([
    ['', 'empty', /empty/],
    ['03600029145', 'length', /12 or 13 digits; this one has 11/],
    ['73000110000170', 'length', /has 14/],
    ['03600O291452', 'non-digit', /character 6 is "O"/],
    ['036000291453', 'check-digit', /last digit .* is 3, but the check digit .* is 2/],
  ])('rejects %j with %s', (input, code, message) => {
    const parsed = parseUpcEan(input);
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.code).toBe(code);
    expect(parsed.message).toMatch(message);
  });
});

describe('parseGtin', () => {
  it.each([
    // GTIN-8 and GTIN-14 use the same GS1 check-digit method; check digits computed here.
    [appendGtinCheckDigit('9638507'), 'gtin-8'],
    [appendGtinCheckDigit('1890400021003'), 'gtin-14'],
    ['8904000210037', 'ean-13'],
  ])('accepts %s as %s', (code, kind) => {
    expect(parseGtin(code)).toMatchObject({ ok: true, kind });
  });

  it('normalises spaces and hyphens', () => {
    expect(normalizeGtin(' 890-4000 21003 7 ')).toBe('8904000210037');
  });
});

describe('UPC-A and EAN-13', () => {
  // GS1: a UPC-A (GTIN-12) is written as an EAN-13 by adding a leading zero.
  it('adds and removes the leading zero', () => {
    expect(convertUpcToEan13('036000291452')).toBe('0036000291452');
    expect(convertEan13ToUpc('0036000291452')).toBe('036000291452');
    expect(convertEan13ToUpc('8904000210037')).toBeNull();
    expect(toEan13('036000291452')).toBe('0036000291452');
    expect(toEan13('8904000210037')).toBe('8904000210037');
    expect(isValidUpcEan('0036000291452')).toBe(true);
  });

  it('refuses to convert an invalid code', () => {
    expect(() => convertUpcToEan13('036000291453')).toThrow(/check digit/);
  });
});

describe('properties', () => {
  const gtinArb = fc
    .constantFrom(7, 11, 12, 13)
    .chain((n) => fc.array(fc.integer({ min: 0, max: 9 }), { minLength: n, maxLength: n }))
    .map((digits) => appendGtinCheckDigit(digits.join('')));

  it('every computed GTIN parses', () => {
    fc.assert(fc.property(gtinArb, (code) => parseGtin(code).ok));
  });

  it('any single-digit change is detected', () => {
    fc.assert(
      fc.property(gtinArb, fc.nat(), fc.integer({ min: 1, max: 9 }), (code, at, delta) => {
        const i = at % code.length;
        const changed = (Number(code[i]) + delta) % 10;
        const mutated = `${code.slice(0, i)}${changed}${code.slice(i + 1)}`;
        return !parseGtin(mutated).ok;
      }),
    );
  });
});
