import { failParse, formatOrdinal, type ParseResult } from './result';

// ISO 3901 structure, as published at isrc.ifpi.org/isrc-standard/structure:
// prefix code (2 letters + 3 alphanumerics), year of reference (2 digits),
// designation code (5 digits). The first two letters are deliberately NOT checked
// against ISO 3166: the agency allocates extra prefixes (QM, QZ, GX, FX, CP, DG, ZZ…).
export const ISRC_PATTERN = /^[A-Z]{2}[A-Z0-9]{3}[0-9]{7}$/;

export type IsrcErrorCode =
  | 'empty'
  | 'length'
  | 'prefix-letters'
  | 'registrant'
  | 'year'
  | 'designation';

export interface IsrcParts {
  /** The stored form: 12 characters, upper case, no hyphens. */
  value: string;
  /** Country/prefix letters plus registrant code, 5 characters (e.g. "QZ9AB"). */
  prefix: string;
  /** Year of reference, 2 digits: the year the code was assigned, not the recording year. */
  year: string;
  /** Designation code, 5 digits. */
  designation: string;
}

/**
 * Reduces any common writing of an ISRC ("isrc us-s1z-99-00001", "USS1Z9900001") to
 * upper case with the "ISRC" label, spaces, hyphens and dots removed. Does not validate.
 */
export function normalizeIsrc(input: string): string {
  return input
    .trim()
    .toUpperCase()
    .replace(/^ISRC[\s:]*/, '')
    .replace(/[\s\-.]/g, '');
}

/**
 * Parses an ISRC from any common writing. On failure the message names the first
 * wrong position and why, in plain English.
 */
export function parseIsrc(input: string): ParseResult<IsrcParts, IsrcErrorCode> {
  const value = normalizeIsrc(input);
  if (value.length === 0) return failParse('empty', 'The ISRC is empty.');
  if (value.length !== 12) {
    return failParse(
      'length',
      `An ISRC has 12 characters (without hyphens); this one has ${value.length}.`,
    );
  }
  for (let i = 0; i < 12; i += 1) {
    const char = value[i]!;
    const where = `The ${formatOrdinal(i + 1)} character of the ISRC, "${char}",`;
    if (i < 2 && !/[A-Z]/.test(char)) {
      return failParse(
        'prefix-letters',
        `${where} must be a letter: an ISRC starts with two letters (the prefix issued by the ISRC agency).`,
      );
    }
    if (i >= 2 && i < 5 && !/[A-Z0-9]/.test(char)) {
      return failParse(
        'registrant',
        `${where} must be a letter or digit: characters 3–5 are the registrant code.`,
      );
    }
    if (i >= 5 && i < 7 && !/[0-9]/.test(char)) {
      return failParse(
        'year',
        `${where} must be a digit: characters 6–7 are the two-digit year of reference.`,
      );
    }
    if (i >= 7 && !/[0-9]/.test(char)) {
      return failParse(
        'designation',
        `${where} must be a digit: characters 8–12 are the five-digit designation code.`,
      );
    }
  }
  return {
    ok: true,
    value,
    prefix: value.slice(0, 5),
    year: value.slice(5, 7),
    designation: value.slice(7),
  };
}

/** True when the input, once normalised, is a well-formed ISRC. */
export function isValidIsrc(input: string): boolean {
  return parseIsrc(input).ok;
}

/**
 * Display form CC-XXX-YY-NNNNN of a valid ISRC (any writing accepted). Throws on an
 * invalid ISRC: call parseIsrc first when the input is untrusted.
 */
export function formatIsrc(input: string): string {
  const parsed = parseIsrc(input);
  if (!parsed.ok) throw new Error(parsed.message);
  const v = parsed.value;
  return `${v.slice(0, 2)}-${v.slice(2, 5)}-${v.slice(5, 7)}-${v.slice(7)}`;
}
