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
 */
export function formatCreditsCell(credits: CsvCredit[]): string {
  return credits
    .map((c) => {
      const isni = c.isni && parseIsni(c.isni).ok ? ` [ISNI ${formatIsni(c.isni)}]` : '';
      return `${c.role}: ${c.name}${isni}`;
    })
    .join('; ');
}

/** Reads a credits cell; roles are checked later with the track form's schema. */
export function parseCreditsCell(
  cell: string,
): { ok: true; credits: CsvCredit[] } | { ok: false; message: string } {
  const credits: CsvCredit[] = [];
  for (const [i, raw] of cell.split(';').entries()) {
    const entry = raw.trim();
    if (entry === '') continue;
    const match = /^([^:]+):\s*(.+?)(?:\s*\[ISNI\s*([^\]]*)\])?$/i.exec(entry);
    if (!match) {
      return {
        ok: false,
        message: `Credit ${i + 1} ("${entry}") should read "role: Name", e.g. "composer: Ada Lane".`,
      };
    }
    credits.push({
      role: match[1]!.trim().toLowerCase(),
      name: match[2]!.trim(),
      ...(match[3] ? { isni: match[3].trim() } : {}),
    });
  }
  return { ok: true, credits };
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

/** Splits a CSV into rows keyed by our column names; unknown or missing columns are file errors. */
export function parseTrackCsv(text: string): ParsedCsv {
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), {
    skipEmptyLines: 'greedy',
  });
  const fileErrors: string[] = [];
  const [header, ...body] = parsed.data;
  if (!header) return { fileErrors: ['The file has no header row.'], columns: [], rows: [] };
  const names = header.map((h) => h.trim().toLowerCase());
  const unknown = names.filter((n) => !(CSV_COLUMNS as readonly string[]).includes(n));
  if (unknown.length > 0) {
    fileErrors.push(
      `Unknown column${unknown.length > 1 ? 's' : ''}: ${unknown.join(', ')}. The columns are: ${CSV_COLUMNS.join(', ')}.`,
    );
  }
  const missing = REQUIRED_CSV_COLUMNS.filter((c) => !names.includes(c));
  if (missing.length > 0) {
    fileErrors.push(
      `The file has no ${missing.join(', ')} column; export the CSV from Quayside to get one.`,
    );
  }
  const duplicate = names.find((n, i) => names.indexOf(n) !== i);
  if (duplicate) fileErrors.push(`The column ${duplicate} appears twice.`);
  for (const error of parsed.errors) {
    if (error.code === 'UndetectableDelimiter') continue;
    fileErrors.push(`Row ${(error.row ?? 0) + 1}: ${error.message}.`);
  }
  const columns = names.filter((n): n is CsvColumn =>
    (CSV_COLUMNS as readonly string[]).includes(n),
  );
  const rows = body.map((cells, index) => {
    const values: Partial<Record<CsvColumn, string>> = {};
    names.forEach((name, i) => {
      if ((CSV_COLUMNS as readonly string[]).includes(name)) {
        values[name as CsvColumn] = (cells[i] ?? '').trim();
      }
    });
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
