import { describe, expect, it } from 'vitest';
import {
  layoutUpdateSchema,
  registrantInputSchema,
  releaseUpdateSchema,
  secondsToFrames,
  trackUpdateSchema,
} from '@/lib/api/metadata-schemas';

function issues(result: {
  success: boolean;
  error?: { issues: { path: PropertyKey[]; message: string }[] };
}) {
  return Object.fromEntries((result.error?.issues ?? []).map((i) => [i.path.join('.'), i.message]));
}

describe('release form schema', () => {
  it('normalises what people type', () => {
    const parsed = releaseUpdateSchema.parse({
      version: 3,
      upcEan: '2 001234 50002 9',
      pLine: '(P) 2026 Brackwater Sound',
      cLine: '© 2026 Brackwater Sound',
      language: 'PT-br',
      catalogueNumber: '  ',
      releaseDate: '',
    });
    expect(parsed).toEqual({
      version: 3,
      upcEan: '2001234500029',
      pLine: '2026 Brackwater Sound',
      cLine: '2026 Brackwater Sound',
      language: 'pt-BR',
      catalogueNumber: null,
      releaseDate: null,
    });
  });

  it('says which check digit is right for a mistyped barcode (GS1 example 629104150021 → 3)', () => {
    const result = releaseUpdateSchema.safeParse({ version: 1, upcEan: '6291041500214' });
    expect(issues(result).upcEan).toBe(
      'The last digit of this UPC/EAN is 4, but the check digit for the first 12 digits is 3; one of the digits is probably mistyped.',
    );
  });

  it('refuses impossible dates, bare ℗ owners, unknown fields and a missing version', () => {
    const result = releaseUpdateSchema.safeParse({
      releaseDate: '2027-02-29',
      pLine: 'Brackwater Sound',
      colour: 'blue',
    });
    const found = issues(result);
    expect(found.version).toBe('Say which version you read');
    expect(found.releaseDate).toBe('Enter a date as YYYY-MM-DD, e.g. 2027-05-14');
    expect(found.pLine).toMatch(/year, then the owner/);
    expect(Object.values(found).join(' ')).toMatch(/colour/);
  });
});

describe('track form schema', () => {
  it('stores ISRC, ISWC and ISNI bare and the side as one capital letter', () => {
    expect(
      trackUpdateSchema.parse({
        recordingVersion: 1,
        isrc: 'ISRC: gx-a1b-26-00042',
        iswc: 't-034.524.680-1',
        side: 'side b',
        credits: [{ name: ' Ada ', role: 'composer', isni: '0000 0001 2103 2683' }],
      }),
    ).toEqual({
      recordingVersion: 1,
      isrc: 'GXA1B2600042',
      iswc: 'T0345246801',
      side: 'B',
      credits: [{ name: 'Ada', role: 'composer', isni: '0000000121032683' }],
    });
  });

  it('explains a wrong ISWC check digit and an unknown credit role', () => {
    const found = issues(
      trackUpdateSchema.safeParse({
        recordingVersion: 1,
        iswc: 'T-034.524.680-2',
        credits: [{ name: 'A', role: 'caterer' }],
      }),
    );
    expect(found.iswc).toMatch(/check digit is 2, but .* it should be 1/);
    expect(found['credits.0.role']).toMatch(/^Choose a role: composer, lyricist/);
  });
});

describe('layout and registrant schemas', () => {
  it('gaps are whole CD frames, 0 to 600 s', () => {
    expect(secondsToFrames(2)).toBe(150);
    expect(secondsToFrames(0.0133)).toBe(1);
    expect(
      layoutUpdateSchema.safeParse({ version: 1, tracks: [{ id: 'a', gapBeforeFrames: 1.5 }] })
        .success,
    ).toBe(false);
    expect(
      layoutUpdateSchema.safeParse({ version: 1, tracks: [{ id: 'a', gapBeforeFrames: 45_001 }] })
        .success,
    ).toBe(false);
    expect(
      layoutUpdateSchema.safeParse({ version: 1, tracks: [{ id: 'a', gapBeforeFrames: 45_000 }] })
        .success,
    ).toBe(true);
  });

  it('a registrant prefix is two letters and three letters or digits; the range runs upward', () => {
    expect(
      registrantInputSchema.parse({ prefix: 'xq-brk', rangeStart: 0, rangeEnd: 99_999 }).prefix,
    ).toBe('XQBRK');
    const found = issues(
      registrantInputSchema.safeParse({ prefix: '1QBRK', rangeStart: 500, rangeEnd: 10 }),
    );
    expect(found.prefix).toMatch(/two letters followed by three letters or digits/);
    const range = issues(
      registrantInputSchema.safeParse({ prefix: 'XQBRK', rangeStart: 500, rangeEnd: 10 }),
    );
    expect(range.rangeEnd).toBe('The range must end at or after where it starts');
  });
});
