import { describe, expect, it } from 'vitest';
import type { Track } from '@/lib/api/schemas';
import {
  buildTrackCsv,
  formatCreditsCell,
  parseCreditsCell,
  parseTrackCsv,
  parseYesNo,
} from '@/lib/server/metadata/csv-format';

const track: Track = {
  id: 'trk-1',
  position: 1,
  disc: 1,
  side: 'A',
  gapBeforeFrames: 0,
  recordingId: 'rec-1',
  recordingVersion: 3,
  title: 'Tide, "Table"\nand Chart',
  versionTitle: 'Extended Mix',
  artist: 'Mira Ostrander; feat. Nobody',
  isrc: 'XQBRK2600001',
  iswc: 'T0345246801',
  explicit: true,
  credits: [
    { name: 'Ada Lane', role: 'composer', isni: '0000000121032683' },
    { name: 'Bo Reed', role: 'producer' },
  ],
  audio: null,
};

describe('track CSV format', () => {
  it('writes written forms and reads back exactly what it wrote (commas, quotes, new lines)', () => {
    const csv = buildTrackCsv([track]);
    expect(csv.startsWith('\uFEFFposition,track_id,disc,side,title,')).toBe(true);
    const parsed = parseTrackCsv(csv);
    expect(parsed.fileErrors).toEqual([]);
    expect(parsed.rows).toEqual([
      {
        line: 2,
        values: {
          position: '1',
          track_id: 'trk-1',
          disc: '1',
          side: 'A',
          title: 'Tide, "Table"\nand Chart',
          version_title: 'Extended Mix',
          artist: 'Mira Ostrander; feat. Nobody',
          isrc: 'XQ-BRK-26-00001',
          iswc: 'T-034.524.680-1',
          explicit: 'yes',
          credits: 'composer: Ada Lane [ISNI 0000 0001 2103 2683]; producer: Bo Reed',
        },
      },
    ]);
  });

  it('credits cell round trip, and a plain message for an entry without a role', () => {
    const cell = formatCreditsCell(track.credits);
    expect(parseCreditsCell(cell)).toEqual({
      ok: true,
      credits: [
        { name: 'Ada Lane', role: 'composer', isni: '0000 0001 2103 2683' },
        { name: 'Bo Reed', role: 'producer' },
      ],
    });
    expect(parseCreditsCell('')).toEqual({ ok: true, credits: [] });
    const bad = parseCreditsCell('composer: A; Just A Name');
    expect(bad).toEqual({
      ok: false,
      message: 'Credit 2 ("Just A Name") should read "role: Name", e.g. "composer: Ada Lane".',
    });
  });

  it('names unknown and missing columns as file errors', () => {
    const parsed = parseTrackCsv('title,colour\nA,blue\n');
    expect(parsed.fileErrors).toEqual([
      'Unknown column: colour. The columns are: position, track_id, disc, side, title, version_title, artist, isrc, iswc, explicit, credits.',
      'The file has no track_id column; export the CSV from Quayside to get one.',
    ]);
  });

  it.each([
    ['yes', true],
    ['No', false],
    ['TRUE', true],
    ['0', false],
    ['', false],
    ['maybe', null],
  ] as const)('explicit %j → %j', (cell, value) => {
    expect(parseYesNo(cell)).toBe(value);
  });
});
