/**
 * Fuzzing the track-metadata CSV import's pure half (parseTrackCsv + checkCsvRow, what the
 * import route runs before it touches the database) with fast-check:
 *
 * - any valid export reads back to the same values, also with harmless edits (CRLF → LF or
 *   CR, no BOM, blank lines, columns in another order);
 * - mutations of a valid export (byte flips, truncation, inserted quotes, new lines, BOMs,
 *   NULs, huge fields, wrong column counts, duplicated headers, random Unicode) and random
 *   text never throw, finish within a time bound, and answer a result no bigger than a small
 *   multiple of the input (no unbounded output or memory);
 * - the largest file the route accepts, in its worst shapes, is read quickly and in bounded
 *   memory.
 *
 * Counts and seed come from tests/support/fuzz.ts (FUZZ_RUNS, FUZZ_SEED).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { csvImportRequestSchema } from '@/lib/api/metadata-schemas';
import type { Track } from '@/lib/api/schemas';
import { computeIsniCheckCharacter } from '@/lib/identifiers/isni';
import { computeIswcCheckDigit } from '@/lib/identifiers/iswc';
import {
  buildTrackCsv,
  CSV_COLUMNS,
  MAX_CSV_ROWS,
  parseCreditsCell,
  parseTrackCsv,
} from '@/lib/server/metadata/csv-format';
import {
  type Candidate,
  changedFields,
  checkCsvRow,
  currentOf,
} from '@/lib/server/metadata/csv-import';
import { CREDIT_ROLES } from '@/lib/specs/types';
import { fuzzTimeout, runFuzz } from '../../support/fuzz';

/** The route refuses a CSV longer than this (csvImportRequestSchema). */
const MAX_CSV_CHARS = 2_000_000;
/** Time one case may take; a linear parse of 2 MB takes well under this on a slow CI core. */
const CASE_MS = 2_000;
/** A generous size for one row's report of errors, without the cells it echoes. */
const ROW_REPORT_CHARS = 1_000;

// ---------------------------------------------------------------- generated valid tracks

/** Text as the track form stores it: trimmed, not empty, at most `max` UTF-16 units. */
const storedText = (max: number) =>
  fc
    .oneof(
      { weight: 3, arbitrary: fc.string({ minLength: 1, maxLength: 40 }) },
      { weight: 2, arbitrary: fc.string({ unit: 'grapheme', minLength: 1, maxLength: 30 }) },
      { weight: 1, arbitrary: fc.string({ unit: 'binary', minLength: 1, maxLength: 30 }) },
      {
        weight: 2,
        arbitrary: fc
          .array(
            fc.constantFrom(
              'A',
              'é',
              ',',
              '"',
              '\n',
              '\r\n',
              ';',
              ':',
              '[',
              ']',
              ' ',
              '=',
              '\\',
              '[ISNI 1]',
              '[isni',
            ),
            {
              minLength: 1,
              maxLength: 30,
            },
          )
          .map((parts) => parts.join('')),
      },
    )
    .map((s) => s.trim().slice(0, max))
    .filter((s) => s.length > 0 && s.trim() === s);

const digits = (n: number) =>
  fc.array(fc.integer({ min: 0, max: 9 }), { minLength: n, maxLength: n }).map((d) => d.join(''));
const upper = fc.constantFrom(...'ABCDEFGHIJKLMNOPQRSTUVWXYZ');
const isrc = fc
  .tuple(
    fc.array(upper, { minLength: 2, maxLength: 2 }),
    fc.array(fc.oneof(upper, fc.constantFrom(...'0123456789')), { minLength: 3, maxLength: 3 }),
    digits(7),
  )
  .map(([cc, reg, rest]) => `${cc.join('')}${reg.join('')}${rest}`);
const iswc = digits(9).map((work) => `T${work}${computeIswcCheckDigit(work)}`);
const isni = digits(15).map((first) => `${first}${computeIsniCheckCharacter(first)}`);
const credit = fc.record({
  name: storedText(200),
  role: fc.constantFrom(...CREDIT_ROLES),
  isni: fc.option(isni, { nil: undefined }),
});

const trackFields = fc.record({
  title: storedText(200),
  versionTitle: fc.option(storedText(120), { nil: null }),
  artist: storedText(200),
  isrc: fc.option(isrc, { nil: null }),
  iswc: fc.option(iswc, { nil: null }),
  explicit: fc.boolean(),
  credits: fc.array(credit, { maxLength: 4 }),
  disc: fc.integer({ min: 1, max: 99 }),
  side: fc.option(upper, { nil: null }),
});

const tracks = fc.array(trackFields, { minLength: 1, maxLength: 12 }).map((list) =>
  list.map(
    (f, i): Track => ({
      id: `trk-${i + 1}`,
      position: i + 1,
      gapBeforeFrames: 0,
      recordingId: `rec-${i + 1}`,
      recordingVersion: 1,
      audio: null,
      ...f,
      credits: f.credits.map((c) => (c.isni ? c : { name: c.name, role: c.role })),
    }),
  ),
);

// ---------------------------------------------------------------- the code under test

interface Outcome {
  fileErrors: string[];
  rows: { line: number; candidate: Candidate | null; errors: { message: string }[] }[];
}

const fallback: Candidate = {
  title: 'Fallback',
  versionTitle: null,
  artist: 'Fixture Artist',
  isrc: null,
  iswc: null,
  explicit: false,
  credits: [],
  disc: 1,
  side: null,
};

/** What the import computes before the database: the parse, then every row checked. */
function importPure(text: string, known: Track[] = []): Outcome {
  const byId = new Map(known.map((t) => [t.id, currentOf(t)]));
  const parsed = parseTrackCsv(text);
  return {
    fileErrors: parsed.fileErrors,
    rows: parsed.rows.map(({ line, values }) => {
      const checked = checkCsvRow(values, byId.get(values.track_id ?? '') ?? fallback);
      return { line, ...checked };
    }),
  };
}

/** Runs the import on hostile text: no throw, a time bound, and an answer of bounded size. */
function expectWellBehaved(text: string, known: Track[] = []): Outcome {
  const started = performance.now();
  const outcome = importPure(text, known);
  const ms = performance.now() - started;
  expect(ms, `one case took ${ms.toFixed(0)} ms`).toBeLessThan(CASE_MS);
  for (const message of outcome.fileErrors) expect(typeof message).toBe('string');
  expect(outcome.rows.length).toBeLessThanOrEqual(MAX_CSV_ROWS);
  // The preview the route would send back: cells echoed at most a few times over, plus a
  // bounded report per row (MAX_CSV_ROWS of them at most), whatever the input's shape.
  const answerSize = JSON.stringify(outcome).length;
  expect(answerSize).toBeLessThan(4 * text.length + ROW_REPORT_CHARS * MAX_CSV_ROWS + 20_000);
  return outcome;
}

// ---------------------------------------------------------------- mutations

const utf8 = new TextEncoder();
// Decoding as the server does: the route reads JSON, whose UTF-8 decoder replaces bad bytes.
const lenientUtf8 = new TextDecoder('utf-8', { fatal: false });

type Mutation = (text: string) => string;

const at = (text: string, fraction: number) => Math.floor(fraction * (text.length + 1));
const fraction = fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true });

const insertable = fc.oneof(
  fc.constantFrom(
    '"',
    '""',
    '\n',
    '\r',
    '\r\n',
    '\uFEFF',
    '\u0000',
    ',',
    ',,,,',
    ';',
    ':',
    '[ISNI ',
    ' [ISNI '.repeat(200),
    '=HYPERLINK("x")',
    '\u202E',
    '\uD800',
    'track_id',
  ),
  fc.string({ unit: 'binary', maxLength: 20 }),
  fc.string({ unit: 'grapheme', maxLength: 20 }),
);

/** Byte flips in the UTF-8 encoding (may break multi-byte characters). */
const byteFlips = fc
  .array(fc.tuple(fraction, fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 6 })
  .map((flips) => (text: string) => {
    const bytes = utf8.encode(text);
    if (bytes.length === 0) return text;
    for (const [f, value] of flips) bytes[Math.floor(f * bytes.length)] = value;
    return lenientUtf8.decode(bytes);
  });

const truncation = fraction.map((f) => (text: string) => text.slice(0, at(text, f)));

/** Quotes, line breaks, BOMs, NULs, separators, random Unicode, anywhere. */
const insertion = fc.tuple(fraction, insertable).map(
  ([f, s]) =>
    (text: string) =>
      text.slice(0, at(text, f)) + s + text.slice(at(text, f)),
);

const hugeField = fc
  .tuple(
    fraction,
    fc.constantFrom('x', 'é', '"', ';', ' [ISNI ', 'a,', '\\;'),
    fc.integer({ min: 1_000, max: 100_000 }),
  )
  .map(([f, unit, chars]) => (text: string) => {
    const big = unit.repeat(Math.ceil(chars / unit.length));
    return text.slice(0, at(text, f)) + big + text.slice(at(text, f));
  });

/** A line gains or loses cells. */
const wrongColumnCount = fc
  .tuple(fc.nat(), fc.boolean(), fc.integer({ min: 1, max: 30 }))
  .map(([line, add, n]) => (text: string) => {
    const lines = text.split('\r\n');
    const i = line % lines.length;
    const cells = (lines[i] ?? '').split(',');
    lines[i] = add ? `${lines[i]}${','.repeat(n)}` : cells.slice(n).join(',');
    return lines.join('\r\n');
  });

/** CRLF → LF, CR, or a mix of the three. */
const lineEndings = fc.constantFrom('\n', '\r', 'mixed').map(
  (ending) => (text: string) =>
    ending === 'mixed'
      ? text
          .split('\r\n')
          .map((l, i) => l + ['\n', '\r', '\r\n'][i % 3])
          .join('')
      : text.replaceAll('\r\n', ending),
);

/** A header cell duplicated, renamed or added. */
const headerCell = fc
  .tuple(fc.constantFrom(...CSV_COLUMNS, 'colour', '', ' TITLE ', '__proto__'), fc.nat())
  .map(([name, where]) => (text: string) => {
    const end = text.indexOf('\r\n');
    if (end < 0) return text;
    const header = text.slice(0, end).split(',');
    header.splice(where % (header.length + 1), 0, name);
    return header.join(',') + text.slice(end);
  });

const manyColumns = fc.integer({ min: 100, max: 20_000 }).map((n) => (text: string) => {
  const end = Math.max(0, text.indexOf('\r\n'));
  const extra = Array.from({ length: n }, (_, i) => `c${i}`).join(',');
  return `${text.slice(0, end)},${extra}${text.slice(end)}`;
});

const manyRows = fc
  .tuple(fc.integer({ min: 10, max: 5_000 }), fc.constantFrom('x', 'trk-1', '"', ','))
  .map(
    ([n, row]) =>
      (text: string) =>
        `${text}${`${row}\r\n`.repeat(n)}`,
  );

// Size-heavy mutations are rarer: each costs milliseconds, and the largest shapes have their
// own cases below.
const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  { weight: 4, arbitrary: byteFlips },
  { weight: 2, arbitrary: truncation },
  { weight: 6, arbitrary: insertion },
  { weight: 1, arbitrary: hugeField },
  { weight: 3, arbitrary: wrongColumnCount },
  { weight: 2, arbitrary: lineEndings },
  { weight: 3, arbitrary: headerCell },
  { weight: 1, arbitrary: manyColumns },
  { weight: 1, arbitrary: manyRows },
);

/** A valid export with 1–6 mutations applied in turn. */
const mutatedExport = fc
  .tuple(tracks, fc.array(mutation, { minLength: 1, maxLength: 6 }))
  .map(([list, mutations]) => ({
    tracks: list,
    text: mutations.reduce((text, m) => m(text), buildTrackCsv(list)),
  }));

const csvAlphabet = fc.constantFrom(
  ',',
  '"',
  '\n',
  '\r',
  '\r\n',
  ' ',
  ';',
  ':',
  '[',
  ']',
  'a',
  '1',
  'é',
  '\uFEFF',
  '\u0000',
  'track_id',
  'title',
  'credits',
  'composer: ',
  '[ISNI ',
  'yes',
);
const randomText = fc.oneof(
  fc.string({ unit: 'binary', maxLength: 3000 }),
  fc.string({ unit: csvAlphabet, maxLength: 2000 }),
  fc
    .tuple(
      fc.constantFrom('track_id,title,credits\r\n', 'track_id\n', ''),
      fc.string({ unit: csvAlphabet, maxLength: 2000 }),
    )
    .map(([head, rest]) => head + rest),
  fc.uint8Array({ maxLength: 4000 }).map((bytes) => lenientUtf8.decode(bytes)),
);

// ---------------------------------------------------------------- properties

describe('CSV import fuzzing (fast-check)', () => {
  it(
    'a valid export reads back to the same values (round trip)',
    async () => {
      await runFuzz(
        'csv: export → import round trip',
        fc.property(tracks, (list) => {
          const csv = buildTrackCsv(list);
          const outcome = importPure(csv, list);
          expect(outcome.fileErrors).toEqual([]);
          expect(outcome.rows).toHaveLength(list.length);
          for (const [i, row] of outcome.rows.entries()) {
            const track = list[i]!;
            expect(row.errors, JSON.stringify(track)).toEqual([]);
            expect(row.candidate).not.toBeNull();
            expect(changedFields(row.candidate!, currentOf(track))).toEqual([]);
          }
        }),
        1000,
      );
    },
    fuzzTimeout(60_000),
  );

  it(
    'harmless edits (line endings, no BOM, blank lines, column order) still read back the same',
    async () => {
      const edit = fc.record({
        ending: fc.constantFrom('\r\n', '\n', '\r'),
        bom: fc.boolean(),
        blankLines: fc.boolean(),
        order: fc.shuffledSubarray([...CSV_COLUMNS], { minLength: CSV_COLUMNS.length }),
      });
      await runFuzz(
        'csv: harmless edits round trip',
        fc.property(tracks, edit, (list, { ending, bom, blankLines, order }) => {
          // Rebuild the file with the columns in another order, through the exporter's cells.
          const exported = parseTrackCsv(buildTrackCsv(list));
          const quote = (cell: string) =>
            /[",\r\n]/.test(cell) || cell !== cell.trim()
              ? `"${cell.replaceAll('"', '""')}"`
              : cell;
          const lines = [
            order.join(','),
            ...exported.rows.map((r) => order.map((c) => quote(r.values[c] ?? '')).join(',')),
          ];
          const text =
            (bom ? '\uFEFF' : '') + lines.join(blankLines ? ending + ending : ending) + ending;
          const outcome = importPure(text, list);
          expect(outcome.fileErrors).toEqual([]);
          for (const [i, row] of outcome.rows.entries()) {
            expect(row.errors).toEqual([]);
            expect(changedFields(row.candidate!, currentOf(list[i]!))).toEqual([]);
          }
        }),
        500,
      );
    },
    fuzzTimeout(60_000),
  );

  it(
    'mutated exports never throw, hang or answer without bound',
    async () => {
      await runFuzz(
        'csv: mutated exports',
        fc.property(mutatedExport, ({ tracks: list, text }) => {
          expectWellBehaved(text, list);
        }),
        1200,
      );
    },
    fuzzTimeout(60_000),
  );

  it(
    'random text never throws, hangs or answers without bound',
    async () => {
      await runFuzz(
        'csv: random text',
        fc.property(randomText, (text) => {
          expectWellBehaved(text);
        }),
        1500,
      );
    },
    fuzzTimeout(60_000),
  );

  it(
    'credit cells of any text are read in linear time',
    async () => {
      const cell = fc.oneof(
        fc.string({ unit: 'binary', maxLength: 500 }),
        fc.string({
          unit: fc.constantFrom('composer', ':', ' ', ';', '[', ']', 'ISNI', '[ISNI ', '\n', 'x'),
          maxLength: 2000,
        }),
      );
      await runFuzz(
        'csv: credit cells',
        fc.property(cell, (text) => {
          const started = performance.now();
          const result = parseCreditsCell(text);
          expect(performance.now() - started).toBeLessThan(CASE_MS);
          if (result.ok) {
            for (const c of result.credits) {
              expect(c.name.length).toBeGreaterThan(0);
              expect(text).toContain(c.name);
            }
          } else {
            expect(result.message.length).toBeLessThan(300);
          }
        }),
        1000,
      );
    },
    fuzzTimeout(60_000),
  );
});

describe('the largest file the route accepts, in its worst shapes', () => {
  const near = (unit: string) => unit.repeat(Math.floor((MAX_CSV_CHARS - 100) / unit.length));
  const shapes: [string, string][] = [
    ['one huge title', `track_id,title\r\ntrk-1,"${near('x')}"\r\n`],
    [
      'one huge credits cell of "[ISNI "',
      `track_id,credits\r\ntrk-1,"composer: ${near(' [ISNI ')}"\r\n`,
    ],
    ['an unterminated quote', `track_id,title\r\ntrk-1,"${near('a\r\n')}`],
    [
      'a header of 250 000 columns',
      `track_id,${Array.from({ length: 250_000 }, (_, i) => `c${i}`).join(',')}\r\n`,
    ],
    ['a header of one column named 180 000 times', `${'title,'.repeat(180_000)}track_id\r\n`],
    ['a million one-character rows', `track_id\r\n${near('x\n')}`],
    ['a million stray quotes', `track_id\r\n${near('a"b\n')}`],
    ['only separators', near(',')],
    ['only new lines', near('\r\n')],
  ];

  it.each(shapes)('%s: read in bounded time and memory', { timeout: 30_000 }, (_, text) => {
    expect(text.length).toBeLessThanOrEqual(MAX_CSV_CHARS);
    expect(csvImportRequestSchema.safeParse({ csv: text }).success).toBe(true);
    const before = process.memoryUsage().heapUsed;
    const started = performance.now();
    const outcome = importPure(text);
    const ms = performance.now() - started;
    const grew = process.memoryUsage().heapUsed - before;
    expect(ms, `${ms.toFixed(0)} ms`).toBeLessThan(5_000);
    // What stays reachable after the parse: the answer, a small multiple of the input at most.
    expect(JSON.stringify(outcome).length).toBeLessThan(
      3 * text.length + ROW_REPORT_CHARS * MAX_CSV_ROWS,
    );
    // Garbage may not be collected yet, so this is a loose ceiling: 2 MB must not cost a GB.
    expect(grew, `heap grew by ${(grew / 1e6).toFixed(0)} MB`).toBeLessThan(500e6);
  });

  it('one character over the limit is refused at the boundary', () => {
    const parsed = csvImportRequestSchema.safeParse({ csv: 'x'.repeat(MAX_CSV_CHARS + 1) });
    expect(parsed.success).toBe(false);
  });
});
