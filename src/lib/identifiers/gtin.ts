import { failParse, type ParseResult } from './result';

/** GS1 GTIN lengths: GTIN-8, GTIN-12 (UPC-A), GTIN-13 (EAN-13), GTIN-14. */
export const GTIN_LENGTHS = [8, 12, 13, 14] as const;
export type GtinLength = (typeof GTIN_LENGTHS)[number];

export type GtinErrorCode = 'empty' | 'non-digit' | 'length' | 'check-digit';

export interface GtinParts {
  /** Digits only, including the check digit. */
  value: string;
  length: GtinLength;
  /** 'upc-a' for 12 digits, 'ean-13' for 13, 'gtin-8' and 'gtin-14' otherwise. */
  kind: 'gtin-8' | 'upc-a' | 'ean-13' | 'gtin-14';
  checkDigit: number;
}

const KIND_BY_LENGTH: Record<GtinLength, GtinParts['kind']> = {
  8: 'gtin-8',
  12: 'upc-a',
  13: 'ean-13',
  14: 'gtin-14',
};

/** Removes spaces and hyphens from a barcode number. Does not validate. */
export function normalizeGtin(input: string): string {
  return input.trim().replace(/[\s-]/g, '');
}

/**
 * The GS1 check digit for the data digits of a GTIN (everything but the check digit).
 * GS1 "How to calculate a check digit manually": from the rightmost data digit, weight
 * alternately 3 and 1; the check digit is (10 − sum mod 10) mod 10.
 */
export function computeGtinCheckDigit(dataDigits: string): number {
  if (!/^[0-9]+$/.test(dataDigits)) throw new Error('GTIN data must be digits only.');
  let sum = 0;
  for (let i = 0; i < dataDigits.length; i += 1) {
    const digit = Number(dataDigits[dataDigits.length - 1 - i]);
    sum += digit * (i % 2 === 0 ? 3 : 1);
  }
  return (10 - (sum % 10)) % 10;
}

function parseGtinOfLengths(
  input: string,
  lengths: readonly GtinLength[],
  label: string,
): ParseResult<GtinParts, GtinErrorCode> {
  const value = normalizeGtin(input);
  if (value.length === 0) return failParse('empty', `The ${label} is empty.`);
  const bad = value.search(/[^0-9]/);
  if (bad >= 0) {
    return failParse(
      'non-digit',
      `A ${label} is digits only; character ${bad + 1} is "${value[bad]}".`,
    );
  }
  if (!(lengths as readonly number[]).includes(value.length)) {
    return failParse(
      'length',
      `A ${label} has ${lengths.join(' or ')} digits; this one has ${value.length}.`,
    );
  }
  const length = value.length as GtinLength;
  const expected = computeGtinCheckDigit(value.slice(0, -1));
  const actual = Number(value[value.length - 1]);
  if (expected !== actual) {
    return failParse(
      'check-digit',
      `The last digit of this ${label} is ${actual}, but the check digit for the first ${length - 1} digits is ${expected}; one of the digits is probably mistyped.`,
    );
  }
  return { ok: true, value, length, kind: KIND_BY_LENGTH[length], checkDigit: actual };
}

/** Parses any GTIN (8, 12, 13 or 14 digits) with its GS1 check digit. */
export function parseGtin(input: string): ParseResult<GtinParts, GtinErrorCode> {
  return parseGtinOfLengths(input, GTIN_LENGTHS, 'GTIN');
}

/** Parses a release barcode: UPC-A (12 digits) or EAN-13 (13 digits), check digit included. */
export function parseUpcEan(input: string): ParseResult<GtinParts, GtinErrorCode> {
  return parseGtinOfLengths(input, [12, 13], 'UPC/EAN');
}

/** True when the input is a UPC-A or EAN-13 with a correct check digit. */
export function isValidUpcEan(input: string): boolean {
  return parseUpcEan(input).ok;
}

/** Appends the GS1 check digit to data digits ("03600029145" → "036000291452"). */
export function appendGtinCheckDigit(dataDigits: string): string {
  return `${dataDigits}${computeGtinCheckDigit(dataDigits)}`;
}

/** A UPC-A as an EAN-13: the same number with a leading 0 (GS1); the check digit is unchanged. */
export function convertUpcToEan13(upc: string): string {
  const parsed = parseGtinOfLengths(upc, [12], 'UPC-A');
  if (!parsed.ok) throw new Error(parsed.message);
  return `0${parsed.value}`;
}

/** An EAN-13 that starts with 0 as a UPC-A; null when it does not start with 0. */
export function convertEan13ToUpc(ean: string): string | null {
  const parsed = parseGtinOfLengths(ean, [13], 'EAN-13');
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.value.startsWith('0') ? parsed.value.slice(1) : null;
}

/** The 13-digit form used for a CD's MCN and most stores: a UPC-A gains a leading 0. */
export function toEan13(input: string): string {
  const parsed = parseUpcEan(input);
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.length === 12 ? `0${parsed.value}` : parsed.value;
}
