import { failParse, type ParseResult } from './result';

export type IswcErrorCode = 'empty' | 'prefix' | 'length' | 'non-digit' | 'check-digit';

export interface IswcParts {
  /** Stored form: "T" and 10 digits, no punctuation (e.g. "T0345246801"). */
  value: string;
  /** The nine-digit work identifier. */
  workDigits: string;
  checkDigit: number;
}

/** Upper case with the "ISWC" label, spaces, hyphens and dots removed. Does not validate. */
export function normalizeIswc(input: string): string {
  return input
    .trim()
    .toUpperCase()
    .replace(/^ISWC[\s:]*/, '')
    .replace(/[\s\-.]/g, '');
}

/**
 * ISO 15707 check digit for the nine work digits: sum = 1 (for the "T") + Σ i·dᵢ over
 * i = 1…9, check = (10 − sum mod 10) mod 10 (REFERENCES §5, from a public ISWC validator).
 */
export function computeIswcCheckDigit(workDigits: string): number {
  if (!/^[0-9]{9}$/.test(workDigits)) throw new Error('ISWC work digits are nine digits.');
  let sum = 1;
  for (let i = 0; i < 9; i += 1) sum += (i + 1) * Number(workDigits[i]);
  return (10 - (sum % 10)) % 10;
}

/** Parses an ISWC in any common writing ("T-034.524.680-1", "t0345246801"). */
export function parseIswc(input: string): ParseResult<IswcParts, IswcErrorCode> {
  const value = normalizeIswc(input);
  if (value.length === 0) return failParse('empty', 'The ISWC is empty.');
  if (!value.startsWith('T')) {
    return failParse(
      'prefix',
      `An ISWC starts with the letter T; this one starts with "${value[0]}".`,
    );
  }
  const digits = value.slice(1);
  const bad = digits.search(/[^0-9]/);
  if (bad >= 0) {
    return failParse(
      'non-digit',
      `After the T, an ISWC is digits only; "${digits[bad]}" is not a digit.`,
    );
  }
  if (digits.length !== 10) {
    return failParse(
      'length',
      `An ISWC has 10 digits after the T (nine for the work and a check digit); this one has ${digits.length}.`,
    );
  }
  const workDigits = digits.slice(0, 9);
  const expected = computeIswcCheckDigit(workDigits);
  const actual = Number(digits[9]);
  if (expected !== actual) {
    return failParse(
      'check-digit',
      `The ISWC check digit is ${actual}, but for T-${workDigits.slice(0, 3)}.${workDigits.slice(3, 6)}.${workDigits.slice(6)} it should be ${expected}; a digit is probably mistyped.`,
    );
  }
  return { ok: true, value, workDigits, checkDigit: actual };
}

/** True when the input is a well-formed ISWC with a correct check digit. */
export function isValidIswc(input: string): boolean {
  return parseIswc(input).ok;
}

/** Display form T-DDD.DDD.DDD-C. Throws on an invalid ISWC. */
export function formatIswc(input: string): string {
  const parsed = parseIswc(input);
  if (!parsed.ok) throw new Error(parsed.message);
  const w = parsed.workDigits;
  return `T-${w.slice(0, 3)}.${w.slice(3, 6)}.${w.slice(6)}-${parsed.checkDigit}`;
}
