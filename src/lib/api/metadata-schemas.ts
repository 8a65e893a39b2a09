/**
 * Request and response shapes of the metadata API (release form, track form, running order,
 * ISRC allocation, registrant, CSV import, artwork), shared by the server and the islands.
 * Pure zod and identifier parsers: safe in the browser bundle.
 */
import { z } from 'zod';
import { parseUpcEan } from '../identifiers/gtin';
import { parseIsni } from '../identifiers/isni';
import { formatIsrc, parseIsrc } from '../identifiers/isrc';
import { parseRegistrantPrefix } from '../identifiers/isrc-allocation';
import { parseIswc } from '../identifiers/iswc';
import { CREDIT_ROLES } from '../specs/types';
import { releaseDetailSchema } from './schemas';

/** CD frames per second (IEC 60908): gaps are stored in frames, shown in seconds. */
export const FRAMES_PER_SECOND = 75;
/** Longest gap before a track we accept: ten minutes is far beyond any real pre-gap. */
export const MAX_GAP_FRAMES = 600 * FRAMES_PER_SECOND;

/** Editions of a release that stop edits until someone reopens it. */
export const LOCKED_RELEASE_STATES = ['approved', 'packaged', 'delivered'] as const;

export const creditRoleLabels: Record<(typeof CREDIT_ROLES)[number], string> = {
  composer: 'Composer',
  lyricist: 'Lyricist',
  arranger: 'Arranger',
  producer: 'Producer',
  'recording-engineer': 'Recording engineer',
  'mixing-engineer': 'Mixing engineer',
  'mastering-engineer': 'Mastering engineer',
  performer: 'Performer',
  'featured-artist': 'Featured artist',
  remixer: 'Remixer',
  publisher: 'Publisher',
};

/** Text that may be left empty: trimmed, and "" becomes null. */
function optionalText(max: number, what: string) {
  return z
    .string()
    .trim()
    .max(max, `${what} is at most ${max} characters`)
    .nullable()
    .transform((s) => (s ? s : null));
}

function requiredText(max: number, what: string) {
  return z
    .string()
    .trim()
    .min(1, `Enter the ${what.toLowerCase()}`)
    .max(max, `${what} is at most ${max} characters`);
}

/** A text field checked (and normalised) by one of the identifier parsers; "" is null. */
function optionalIdentifier(
  parse: (input: string) => { ok: true; value: string } | { ok: false; message: string },
) {
  return z
    .string()
    .nullable()
    .transform((input, ctx) => {
      if (input === null || input.trim() === '') return null;
      const parsed = parse(input);
      if (!parsed.ok) {
        ctx.addIssue({ code: 'custom', message: parsed.message });
        return z.NEVER;
      }
      return parsed.value;
    });
}

const isoDate = z
  .string()
  .trim()
  .nullable()
  .transform((input, ctx) => {
    if (!input) return null;
    const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(input);
    const date = new Date(`${input}T00:00:00Z`);
    if (!match || Number.isNaN(date.getTime()) || date.toISOString().slice(0, 10) !== input) {
      ctx.addIssue({ code: 'custom', message: 'Enter a date as YYYY-MM-DD, e.g. 2027-05-14' });
      return z.NEVER;
    }
    return input;
  });

/** ℗ or © line: the year, then the owner ("2026 Brackwater Sound"); a leading symbol is dropped. */
function rightsLine(symbol: '℗' | '©') {
  const prefix = symbol === '℗' ? /^(℗|\(p\)|p)\s*/i : /^(©|\(c\)|c)\s*/i;
  return z
    .string()
    .trim()
    .max(200, `The ${symbol} line is at most 200 characters`)
    .nullable()
    .transform((input, ctx) => {
      if (!input) return null;
      const text = input.replace(prefix, '');
      if (!/^\d{4}\s+\S/.test(text)) {
        ctx.addIssue({
          code: 'custom',
          message: `Write the ${symbol} line as the year, then the owner, e.g. "2026 Brackwater Sound"`,
        });
        return z.NEVER;
      }
      return text;
    });
}

const languageCode = z
  .string()
  .trim()
  .nullable()
  .transform((input, ctx) => {
    if (!input) return null;
    if (!/^[a-zA-Z]{2,3}(-[a-zA-Z0-9]{2,8})*$/.test(input)) {
      ctx.addIssue({
        code: 'custom',
        message: 'Use a language code such as en, fr or pt-BR (ISO 639 / BCP 47)',
      });
      return z.NEVER;
    }
    const [lang, ...rest] = input.split('-');
    return [lang!.toLowerCase(), ...rest.map((p) => (p.length === 2 ? p.toUpperCase() : p))].join(
      '-',
    );
  });

const version = z.number({ error: 'Say which version you read' }).int().positive();

/** The release form's fields (all of them; the PATCH takes any subset). */
export const releaseFieldsSchema = z.object({
  title: requiredText(200, 'Title'),
  artist: requiredText(200, 'Artist'),
  labelName: requiredText(200, 'Label'),
  catalogueNumber: optionalText(40, 'The catalogue number'),
  upcEan: optionalIdentifier(parseUpcEan),
  releaseDate: isoDate,
  originalReleaseDate: isoDate,
  genre: optionalText(80, 'The genre'),
  language: languageCode,
  pLine: rightsLine('℗'),
  cLine: rightsLine('©'),
  explicit: z.boolean(),
  /** Target delivery profiles: built-in ids (custom profiles come later, checked server-side). */
  profileIds: z.array(z.string().min(1).max(64)).max(20),
});
export type ReleaseFields = z.infer<typeof releaseFieldsSchema>;
export type ReleaseFieldsInput = z.input<typeof releaseFieldsSchema>;

/** PATCH /api/releases/:id/metadata — any subset of the fields, and the version read. */
export const releaseUpdateSchema = releaseFieldsSchema.partial().extend({ version }).strict();
export type ReleaseUpdate = z.infer<typeof releaseUpdateSchema>;

export const creditInputSchema = z.object({
  name: requiredText(200, 'Name'),
  role: z.enum(CREDIT_ROLES, { error: `Choose a role: ${CREDIT_ROLES.join(', ')}` }),
  isni: optionalIdentifier(parseIsni).optional(),
});

const sideLetter = z
  .string()
  .trim()
  .nullable()
  .transform((input, ctx) => {
    if (!input) return null;
    const side = input.replace(/^side\s*/i, '').toUpperCase();
    if (!/^[A-Z]$/.test(side)) {
      ctx.addIssue({ code: 'custom', message: 'A side is one letter, A to Z' });
      return z.NEVER;
    }
    return side;
  });

/** The track form's fields: the recording's, plus disc/side of the track. */
export const trackFieldsSchema = z.object({
  title: requiredText(200, 'Title'),
  versionTitle: optionalText(120, 'The version'),
  artist: requiredText(200, 'Artist'),
  isrc: optionalIdentifier(parseIsrc),
  iswc: optionalIdentifier(parseIswc),
  explicit: z.boolean(),
  credits: z.array(creditInputSchema).max(60),
  disc: z.number().int('A disc number is a whole number').min(1).max(99),
  side: sideLetter,
});
export type TrackFieldsInput = z.input<typeof trackFieldsSchema>;
export type TrackFields = z.infer<typeof trackFieldsSchema>;

/** PATCH /api/releases/:id/tracks/:trackId — any subset of the fields, and the recording version read. */
export const trackUpdateSchema = trackFieldsSchema
  .partial()
  .extend({ recordingVersion: version })
  .strict();
export type TrackUpdate = z.infer<typeof trackUpdateSchema>;

/** PUT /api/releases/:id/order — the whole running order with each track's gap. */
export const layoutUpdateSchema = z
  .object({
    version,
    tracks: z
      .array(
        z.object({
          id: z.string().min(1).max(64),
          gapBeforeFrames: z
            .number()
            .int('A gap is a whole number of CD frames (1/75 s)')
            .min(0, 'A gap cannot be negative')
            .max(MAX_GAP_FRAMES, 'A gap is at most 600 seconds'),
        }),
      )
      .min(1)
      .max(500),
  })
  .strict();
export type LayoutUpdate = z.infer<typeof layoutUpdateSchema>;

/** POST /api/releases/:id/isrc-allocations — the tracks to give a new ISRC (all missing when absent). */
export const isrcAllocationRequestSchema = z
  .object({ trackIds: z.array(z.string().min(1).max(64)).min(1).max(500).optional() })
  .strict();

export const isrcAllocationResponseSchema = z.object({
  allocated: z.array(z.object({ trackId: z.string(), isrc: z.string() })),
  release: releaseDetailSchema,
});

export const registrantInputSchema = z
  .object({
    prefix: z.string().transform((input, ctx) => {
      const parsed = parseRegistrantPrefix(input);
      if (!parsed.ok) {
        ctx.addIssue({ code: 'custom', message: parsed.message });
        return z.NEVER;
      }
      return parsed.value;
    }),
    rangeStart: z.number().int('Whole numbers only').min(0).max(99_999),
    rangeEnd: z.number().int('Whole numbers only').min(0).max(99_999),
  })
  .strict()
  .refine((r) => r.rangeStart <= r.rangeEnd, {
    message: 'The range must end at or after where it starts',
    path: ['rangeEnd'],
  });

export const registrantResponseSchema = z.object({
  registrant: z
    .object({ prefix: z.string(), rangeStart: z.number(), rangeEnd: z.number() })
    .nullable(),
  /** The code the next allocation would hand out (this year of reference), or null. */
  nextIsrc: z.string().nullable(),
  issuedCount: z.number().int().nonnegative(),
});
export type RegistrantResponse = z.infer<typeof registrantResponseSchema>;

/** POST /api/releases/:id/metadata-import — preview (apply false) or write (apply true). */
export const csvImportRequestSchema = z
  .object({
    csv: z.string().min(1, 'The file is empty').max(2_000_000, 'The file is larger than 2 MB'),
    apply: z.boolean().default(false),
    /** Recording versions the preview was computed from; required to apply. */
    basis: z.record(z.string(), z.number().int().positive()).optional(),
  })
  .strict();

export const csvChangeSchema = z.object({
  field: z.string(),
  before: z.string(),
  after: z.string(),
});
export const csvRowSchema = z.object({
  /** 1-based line in the file (the header is line 1). */
  line: z.number().int(),
  trackId: z.string().nullable(),
  position: z.number().int().nullable(),
  title: z.string(),
  changes: z.array(csvChangeSchema),
  errors: z.array(z.object({ column: z.string().nullable(), message: z.string() })),
});
export const csvImportResponseSchema = z.object({
  applied: z.boolean(),
  valid: z.boolean(),
  /** Problems with the file as a whole (missing columns, unreadable CSV). */
  fileErrors: z.array(z.string()),
  rows: z.array(csvRowSchema),
  changeCount: z.number().int().nonnegative(),
  basis: z.record(z.string(), z.number().int().positive()),
  release: releaseDetailSchema.optional(),
});
export type CsvImportResponse = z.infer<typeof csvImportResponseSchema>;

export const artworkSchema = z.object({
  id: z.string(),
  originalName: z.string(),
  format: z.string(),
  widthPx: z.number().int(),
  heightPx: z.number().int(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  createdAt: z.string(),
  url: z.string(),
});
export const artworkResponseSchema = z.object({ artwork: artworkSchema.nullable() });
export type ArtworkInfo = z.infer<typeof artworkSchema>;

/** Display form of a stored ISRC, or the text itself when it is not a valid one. */
export function displayIsrc(isrc: string | null): string {
  if (!isrc) return '';
  return parseIsrc(isrc).ok ? formatIsrc(isrc) : isrc;
}

/** Seconds as CD frames, rounded to the nearest frame. */
export function secondsToFrames(seconds: number): number {
  return Math.round(seconds * FRAMES_PER_SECOND);
}
