import { normalizeIsrc, parseIsrc } from './isrc';
import { failParse, type ParseResult } from './result';

export type AllocationErrorCode =
  | 'invalid-prefix'
  | 'invalid-year'
  | 'invalid-range'
  | 'invalid-count'
  | 'range-exhausted';

/** Designation codes a registrant may hand out, inclusive (ISO 3901: 00000–99999 or a sub-range). */
export interface DesignationRange {
  first: number;
  last: number;
}

export interface IsrcAllocationRequest {
  /** Registrant prefix: two letters and three letters/digits, e.g. "QZ9AB" (hyphens allowed). */
  registrantPrefix: string;
  /** Year of reference, 0–99 or a two-digit string; see yearOfReferenceFor. */
  yearOfReference: number | string;
  /** Sub-range allotted to this registrant; the whole 00000–99999 when absent. */
  range?: DesignationRange;
  /** Every ISRC ever handed out under any prefix, including deleted ones. Others are ignored. */
  issued: Iterable<string>;
}

export interface AllocatedIsrcs {
  /** ISRCs in stored form, in allocation order. */
  isrcs: string[];
  /** Designation numbers of those ISRCs. */
  designations: number[];
}

const FULL_RANGE: DesignationRange = { first: 0, last: 99_999 };

/** Normalises and checks a registrant prefix ("qz-9ab" → "QZ9AB"). */
export function parseRegistrantPrefix(
  input: string,
): ParseResult<{ value: string }, 'invalid-prefix'> {
  const value = normalizeIsrc(input);
  if (!/^[A-Z]{2}[A-Z0-9]{3}$/.test(value)) {
    return failParse(
      'invalid-prefix',
      `A registrant prefix is two letters followed by three letters or digits (e.g. "QZ9AB"); "${input}" is not.`,
    );
  }
  return { ok: true, value };
}

/** Two-digit year of reference for a date, taken in UTC ("2026-12-02" → "26"). */
export function yearOfReferenceFor(date: Date): string {
  return String(date.getUTCFullYear() % 100).padStart(2, '0');
}

function parseYear(input: number | string): string | null {
  const text = typeof input === 'number' ? String(input).padStart(2, '0') : input.trim();
  return /^[0-9]{2}$/.test(text) ? text : null;
}

/**
 * The next `count` ISRCs for a registrant prefix and year of reference, after the highest
 * designation code already issued in the range. Pure: the caller passes every code ever
 * issued and stores the result in the same transaction (with a unique index as the last
 * guard). Codes below the highest issued one are never filled in, so a code handed out
 * and later deleted, or issued outside Quayside out of order, is never reissued.
 */
export function allocateIsrcs(
  request: IsrcAllocationRequest,
  count: number,
): ParseResult<AllocatedIsrcs, AllocationErrorCode> {
  const prefix = parseRegistrantPrefix(request.registrantPrefix);
  if (!prefix.ok) return prefix;
  const year = parseYear(request.yearOfReference);
  if (year === null) {
    return failParse(
      'invalid-year',
      `The year of reference is two digits (e.g. "26"); "${request.yearOfReference}" is not.`,
    );
  }
  const range = request.range ?? FULL_RANGE;
  if (
    !Number.isInteger(range.first) ||
    !Number.isInteger(range.last) ||
    range.first < 0 ||
    range.last > 99_999 ||
    range.first > range.last
  ) {
    return failParse(
      'invalid-range',
      `A designation range runs from a lower to a higher whole number within 00000–99999; ${range.first}–${range.last} does not.`,
    );
  }
  if (!Number.isInteger(count) || count < 1) {
    return failParse('invalid-count', `At least one ISRC must be requested, not ${count}.`);
  }

  const stem = `${prefix.value}${year}`;
  let highest = range.first - 1;
  for (const code of request.issued) {
    const parsed = parseIsrc(code);
    if (!parsed.ok || `${parsed.prefix}${parsed.year}` !== stem) continue;
    const designation = Number(parsed.designation);
    if (designation >= range.first && designation <= range.last && designation > highest) {
      highest = designation;
    }
  }

  const available = range.last - highest;
  if (available < count) {
    const pad = (n: number) => String(n).padStart(5, '0');
    return failParse(
      'range-exhausted',
      available === 0
        ? `Every designation code from ${pad(range.first)} to ${pad(range.last)} for ${prefix.value}, year ${year}, has been handed out; ask the ISRC agency for a new range or wait for the next year of reference.`
        : `Only ${available} designation code${available === 1 ? '' : 's'} remain${available === 1 ? 's' : ''} for ${prefix.value}, year ${year} (up to ${pad(range.last)}), but ${count} were requested.`,
    );
  }

  const designations = Array.from({ length: count }, (_, i) => highest + 1 + i);
  return {
    ok: true,
    designations,
    isrcs: designations.map((d) => `${stem}${String(d).padStart(5, '0')}`),
  };
}

/** The next single ISRC; see allocateIsrcs. */
export function allocateNextIsrc(
  request: IsrcAllocationRequest,
): ParseResult<{ isrc: string; designation: number }, AllocationErrorCode> {
  const result = allocateIsrcs(request, 1);
  if (!result.ok) return result;
  return { ok: true, isrc: result.isrcs[0]!, designation: result.designations[0]! };
}
