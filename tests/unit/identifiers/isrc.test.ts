import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatIsrc, isValidIsrc, normalizeIsrc, parseIsrc } from '@/lib/identifiers';

const letter = fc.constantFrom(...'ABCDEFGHIJKLMNOPQRSTUVWXYZ');
const alnum = fc.constantFrom(...'ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789');
const digit = fc.constantFrom(...'0123456789');
const isrcArb = fc
  .tuple(
    fc.array(letter, { minLength: 2, maxLength: 2 }),
    fc.array(alnum, { minLength: 3, maxLength: 3 }),
    fc.array(digit, { minLength: 7, maxLength: 7 }),
  )
  .map(([a, b, c]) => [...a, ...b, ...c].join(''));

describe('parseIsrc', () => {
  // ISO 3901 display form as shown by the International ISRC Agency
  // (isrc.ifpi.org/isrc-standard/structure): "ISRC AA-6Q7-20-00047".
  it('reads the agency example in its display form', () => {
    const parsed = parseIsrc('ISRC AA-6Q7-20-00047');
    expect(parsed).toEqual({
      ok: true,
      value: 'AA6Q72000047',
      prefix: 'AA6Q7',
      year: '20',
      designation: '00047',
    });
  });

  it.each([
    ['aa-6q7-20-00047', 'AA6Q72000047'],
    ['  AA 6Q7 20 00047 ', 'AA6Q72000047'],
    ['isrc:AA6Q72000047', 'AA6Q72000047'],
    ['AA6Q72000047', 'AA6Q72000047'],
  ])('normalises %j to %s', (input, stored) => {
    expect(normalizeIsrc(input)).toBe(stored);
    expect(parseIsrc(input)).toMatchObject({ ok: true, value: stored });
  });

  // ISRC Agency Bulletin 2015/01: prefixes are not limited to ISO 3166-1 alpha-2; the
  // agency allocated extra prefixes (QM, QZ for the US), and GX, FX, CP, DG and ZZ are in use.
  it.each(['GX', 'FX', 'QM', 'QZ', 'CP', 'DG', 'ZZ'])(
    'accepts the allocated non-ISO-3166 prefix %s',
    (letters) => {
      expect(isValidIsrc(`${letters}A1B2600001`)).toBe(true);
    },
  );

  it.each([
    ['', 'empty', /empty/],
    ['AA6Q7200004', 'length', /12 characters.*has 11/],
    ['AA6Q720000471', 'length', /has 13/],
    ['1A6Q72000047', 'prefix-letters', /1st character.*"1".*two letters/],
    ['A96Q72000047', 'prefix-letters', /2nd character.*"9"/],
    ['AA6_72000047', 'registrant', /4th character.*"_".*registrant code/],
    ['AA6Q7X000047', 'year', /6th character.*"X".*year of reference/],
    ['AA6Q720A0047', 'designation', /8th character.*"A".*designation code/],
  ])('rejects %j with %s', (input, code, message) => {
    const parsed = parseIsrc(input);
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.code).toBe(code);
    expect(parsed.message).toMatch(message);
  });
});

describe('formatIsrc', () => {
  it('writes CC-XXX-YY-NNNNN', () => {
    expect(formatIsrc('aa6q72000047')).toBe('AA-6Q7-20-00047');
  });

  it('refuses an invalid ISRC', () => {
    expect(() => formatIsrc('AA6Q7')).toThrow(/12 characters/);
  });

  it('round-trips: parse(format(x)) is x for every well-formed ISRC', () => {
    fc.assert(
      fc.property(isrcArb, (isrc) => {
        const parsed = parseIsrc(formatIsrc(isrc.toLowerCase()));
        return parsed.ok && parsed.value === isrc;
      }),
    );
  });
});
