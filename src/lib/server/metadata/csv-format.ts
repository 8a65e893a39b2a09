/**
 * The track-metadata CSV: one row per track, a fixed header, written and read with papaparse.
 * Pure (no database): the import logic compares what this parses with the release.
 */
import Papa from 'papaparse';
import type { Track } from '../../api/schemas';
import { formatIsni, parseIsni } from '../../identifiers/isni';
import { formatIsrc, parseIsrc } from '../../identifiers/isrc';
import { formatIswc, parseIswc } from '../../identifiers/iswc';

export const CSV_COLUMNS = [
  'position',
  'track_id',
  'disc',
  'side',
  'title',
  'version_title',
  'artist',
  'isrc',
  'iswc',
  'explicit',
  'credits',
] as const;
export type CsvColumn = (typeof CSV_COLUMNS)[number];

/** Columns a file must have; the others may be left out and then stay as they are. */
export const REQUIRED_CSV_COLUMNS: readonly CsvColumn[] = ['track_id'];

export interface CsvCredit {
  name: string;
  role: string;
  isni?: string | null;
}

/**
 * Credits in one cell: `role: Name` entries separated by semicolons, each with an optional
 * ISNI in brackets, e.g. `composer: Ada Lane [ISNI 0000 0001 2103 2683]; producer: Bo Reed`.
 * A backslash keeps the next `;`, `[` or `\` as part of the name (`performer: Salt\; Pepper`),
 * so any name reads back as it was written.
 */
export function formatCreditsCell(credits: CsvCredit[]): string {
  return credits
    .map((c) => {
      const isni = c.isni && parseIsni(c.isni).ok ? ` [ISNI ${formatIsni(c.isni)}]` : '';
      const name = c.name.replace(/[\\;]/g, '\\$&').replace(/\[(?=\s*isni)/gi, '\\[');
      return `${c.role}: ${name}${isni}`;
    })
    .join('; ');
}

const ESCAPABLE = new Set(['\\', ';', '[']);

/** The cell cut at each `;` that no backslash escapes; escapes are kept for `readCreditEntry`. */
function splitCreditEntries(cell: string): string[] {
  const entries: string[] = [];
  let start = 0;
  for (let i = 0; i < cell.length; i++) {
    const char = cell[i];
    if (char === '\\' && ESCAPABLE.has(cell[i + 1] ?? '')) i++;
    else if (char === ';') {
      entries.push(cell.slice(start, i));
      start = i + 1;
    }
  }
  entries.push(cell.slice(start));
  return entries;
}

/** Index of the last `[` that no backslash escapes, or -1. */
function lastUnescapedBracket(text: string): number {
  let found = -1;
  for (let i = 0; i < text.length; i++) {
    if (text[i] === '\\' && ESCAPABLE.has(text[i + 1] ?? '')) i++;
    else if (text[i] === '[') found = i;
  }
  return found;
}

const unescapeCredit = (text: string) => text.replace(/\\([\\;[])/g, '$1');

/** Reads a credits cell; roles are checked later with the track form's schema. */
export function parseCreditsCell(
  cell: string,
): { ok: true; credits: CsvCredit[] } | { ok: false; message: string } {
  const credits: CsvCredit[] = [];
  for (const [i, raw] of splitCreditEntries(cell).entries()) {
    const entry = raw.trim();
    if (entry === '') continue;
    const credit = readCreditEntry(entry);
    if (!credit) {
      const shown = entry.length > 80 ? `${entry.slice(0, 80)}…` : entry;
      return {
        ok: false,
        message: `Credit ${i + 1} ("${shown}") should read "role: Name", e.g. "composer: Ada Lane".`,
      };
    }
    credits.push(credit);
  }
  return { ok: true, credits };
}

/**
 * One `role: Name [ISNI …]` entry, or null. Read by index, not by one regular expression:
 * a pattern with a lazy name and an optional bracket suffix backtracks quadratically on a
 * cell full of "[ISNI " (seconds for 30 kB, hours for the 2 MB a file may hold).
 */
function readCreditEntry(entry: string): CsvCredit | null {
  const colon = entry.indexOf(':');
  if (colon < 1) return null;
  const role = unescapeCredit(entry.slice(0, colon)).trim().toLowerCase();
  let name = entry.slice(colon + 1).trim();
  let isni: string | undefined;
  if (name.endsWith(']')) {
    const open = lastUnescapedBracket(name);
    if (open >= 0 && name.slice(open + 1, open + 5).toUpperCase() === 'ISNI') {
      isni = name.slice(open + 5, -1).trim();
      name = name.slice(0, open).trim();
    }
  }
  name = unescapeCredit(name).trim();
  if (name === '') return null;
  return { role, name, ...(isni ? { isni } : {}) };
}

function displayOr(value: string | null, format: (v: string) => string, ok: boolean): string {
  if (!value) return '';
  return ok ? format(value) : value;
}

/** The CSV of a release's tracks, in running order, with identifiers in their written forms. */
export function buildTrackCsv(tracks: Track[]): string {
  const rows = tracks.map((t) => ({
    position: String(t.position),
    track_id: t.id,
    disc: String(t.disc),
    side: t.side ?? '',
    title: t.title,
    version_title: t.versionTitle ?? '',
    artist: t.artist,
    isrc: displayOr(t.isrc, formatIsrc, !!t.isrc && parseIsrc(t.isrc).ok),
    iswc: displayOr(t.iswc, formatIswc, !!t.iswc && parseIswc(t.iswc).ok),
    explicit: t.explicit ? 'yes' : 'no',
    credits: formatCreditsCell(t.credits),
  }));
  // A byte-order mark lets spreadsheet programs read the file as UTF-8 (℗, ©, accents).
  return `\uFEFF${Papa.unparse({ fields: [...CSV_COLUMNS], data: rows }, { newline: '\r\n' })}\r\n`;
}

export interface ParsedCsv {
  fileErrors: string[];
  /** Columns present in the header, in our names. */
  columns: CsvColumn[];
  rows: { line: number; values: Partial<Record<CsvColumn, string>> }[];
}

/**
 * Most rows a file may have below its header. A release has one row per track, and the
 * running order takes at most 500 tracks; past this the rows are not read, so a 2 MB file of
 * one-character lines cannot turn into a million row reports.
 */
export const MAX_CSV_ROWS = 1000;
/** Most problems of one kind listed in full; the rest are counted. */
const MAX_LISTED = 20;

function listSome(items: string[]): string {
  const shown = items.slice(0, MAX_LISTED).map((s) => (s.length > 40 ? `${s.slice(0, 40)}…` : s));
  return items.length > MAX_LISTED
    ? `${shown.join(', ')} and ${items.length - MAX_LISTED} more`
    : shown.join(', ');
}

/**
 * Splits a CSV into rows keyed by our column names; unknown or missing columns are file
 * errors. Linear in the size of the text whatever its shape (many columns, many rows, many
 * quoting errors), so a hostile file costs no more than a long one.
 */
export function parseTrackCsv(text: string): ParsedCsv {
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), {
    skipEmptyLines: 'greedy',
  });
  const fileErrors: string[] = [];
  const [header, ...body] = parsed.data;
  if (!header) return { fileErrors: ['The file has no header row.'], columns: [], rows: [] };
  const names = header.map((h) => h.trim().toLowerCase());
  const known = new Set<string>(CSV_COLUMNS);
  const unknown = names.filter((n) => !known.has(n));
  if (unknown.length > 0) {
    fileErrors.push(
      `Unknown column${unknown.length > 1 ? 's' : ''}: ${listSome(unknown)}. The columns are: ${CSV_COLUMNS.join(', ')}.`,
    );
  }
  const missing = REQUIRED_CSV_COLUMNS.filter((c) => !names.includes(c));
  if (missing.length > 0) {
    fileErrors.push(
      `The file has no ${missing.join(', ')} column; export the CSV from Quayside to get one.`,
    );
  }
  // Where each of our columns is; a column named twice is an error, and its last copy is read.
  const indexOf = new Map<CsvColumn, number>();
  let duplicate: string | undefined;
  names.forEach((name, i) => {
    if (!known.has(name)) return;
    if (indexOf.has(name as CsvColumn)) duplicate ??= name;
    indexOf.set(name as CsvColumn, i);
  });
  if (duplicate) fileErrors.push(`The column ${duplicate} appears twice.`);
  const parseErrors = parsed.errors.filter((e) => e.code !== 'UndetectableDelimiter');
  for (const error of parseErrors.slice(0, MAX_LISTED)) {
    fileErrors.push(`Row ${(error.row ?? 0) + 1}: ${error.message}.`);
  }
  if (parseErrors.length > MAX_LISTED) {
    fileErrors.push(`${parseErrors.length - MAX_LISTED} more rows have errors of the same kind.`);
  }
  const columns = names.filter((n): n is CsvColumn => known.has(n));
  if (body.length > MAX_CSV_ROWS) {
    fileErrors.push(
      `The file has ${body.length} rows below its header; a track CSV has one row per track, at most ${MAX_CSV_ROWS}.`,
    );
    return { fileErrors, columns, rows: [] };
  }
  const rows = body.map((cells, index) => {
    const values: Partial<Record<CsvColumn, string>> = {};
    for (const [column, i] of indexOf) values[column] = (cells[i] ?? '').trim();
    return { line: index + 2, values };
  });
  return { fileErrors, columns, rows };
}

/** "yes"/"no" (also true/false, 1/0, y/n, explicit/clean); null when it is none of them. */
export function parseYesNo(cell: string): boolean | null {
  const v = cell.trim().toLowerCase();
  if (['yes', 'y', 'true', '1', 'explicit'].includes(v)) return true;
  if (['no', 'n', 'false', '0', 'clean', ''].includes(v)) return false;
  return null;
}
