import { failParse, type ParseResult } from './result';

export type IsniErrorCode = 'empty' | 'length' | 'non-digit' | 'check-character';

export interface IsniParts {
  /** Stored form: 16 characters, the last a digit or "X", no spaces. */
  value: string;
  checkCharacter: string;
}

/** Upper case with the "ISNI" label, spaces and hyphens removed. Does not validate. */
export function normalizeIsni(input: string): string {
  return input
    .trim()
    .toUpperCase()
    .replace(/^ISNI[\s:]*/, '')
    .replace(/[\s-]/g, '');
}

/**
 * ISO 7064 MOD 11-2 check character for the first 15 digits of an ISNI (ISO 27729):
 * t = (t + d)·2 for each digit, r = (12 − t mod 11) mod 11, 10 is written "X".
 */
export function computeIsniCheckCharacter(first15Digits: string): string {
  if (!/^[0-9]{15}$/.test(first15Digits)) throw new Error('ISNI data is 15 digits.');
  let total = 0;
  for (const char of first15Digits) total = (total + Number(char)) * 2;
  const result = (12 - (total % 11)) % 11;
  return result === 10 ? 'X' : String(result);
}

/** Parses an ISNI in any common writing ("0000 0001 2103 2683", "ISNI 000000012103268X"). */
export function parseIsni(input: string): ParseResult<IsniParts, IsniErrorCode> {
  const value = normalizeIsni(input);
  if (value.length === 0) return failParse('empty', 'The ISNI is empty.');
  if (value.length !== 16) {
    return failParse('length', `An ISNI has 16 characters; this one has ${value.length}.`);
  }
  const bad = value.slice(0, 15).search(/[^0-9]/);
  if (bad >= 0) {
    return failParse(
      'non-digit',
      `The first 15 characters of an ISNI are digits; character ${bad + 1} is "${value[bad]}".`,
    );
  }
  const expected = computeIsniCheckCharacter(value.slice(0, 15));
  const actual = value[15]!;
  if (expected !== actual) {
    return failParse(
      'check-character',
      `The last character of this ISNI is "${actual}", but the check character for the first 15 digits is "${expected}"; a digit is probably mistyped.`,
    );
  }
  return { ok: true, value, checkCharacter: actual };
}

/** True when the input is a well-formed ISNI with a correct check character. */
export function isValidIsni(input: string): boolean {
  return parseIsni(input).ok;
}

/** Display form in four groups of four ("0000 0001 2103 2683"). Throws on an invalid ISNI. */
export function formatIsni(input: string): string {
  const parsed = parseIsni(input);
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.value.replace(/(.{4})(?=.)/g, '$1 ');
}
