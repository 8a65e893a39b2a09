import { eq, inArray } from 'drizzle-orm';
import Papa from 'papaparse';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { csvImportResponseSchema } from '@/lib/api/metadata-schemas';
import { createDatabase } from '@/lib/db/client';
import { auditEvents, recordings } from '@/lib/db/schema';
import { type Client, demoEmails, signedIn } from '../support/http';
import { createFixtureRelease } from './metadata-fixtures';

const db = createDatabase(inject('databaseUrl'));
let coordinator: Client;
let ids: { trackIds: string[]; recordingIds: string[] };

beforeAll(async () => {
  coordinator = await signedIn(demoEmails.coordinator);
  ids = await createFixtureRelease(db, 'rel-meta-csv', {
    tracks: [
      { title: 'Tide, "Table" & Chart', isrc: 'XQBRK2680001' },
      { title: 'Fog Signal' },
      { title: 'Ebb' },
    ],
  });
  await db
    .update(recordings)
    .set({
      iswc: 'T0345246801',
      credits: [
        { name: 'Ada Lane', role: 'composer', isni: '0000000121032683' },
        { name: 'Bo Reed', role: 'producer' },
      ],
    })
    .where(eq(recordings.id, ids.recordingIds[0]!));
});

async function exportCsv(client: Client = coordinator): Promise<string> {
  const response = await client.get('/api/releases/rel-meta-csv/metadata.csv');
  expect(response.status).toBe(200);
  expect(response.headers.get('content-type')).toBe('text/csv; charset=utf-8');
  return response.text();
}

function editCsv(csv: string, edit: (rows: Record<string, string>[]) => void): string {
  const parsed = Papa.parse<Record<string, string>>(csv.replace(/^\uFEFF/, ''), {
    header: true,
    skipEmptyLines: true,
  });
  edit(parsed.data);
  return Papa.unparse(parsed.data);
}

async function importCsv(csv: string, apply = false, basis?: Record<string, number>) {
  return coordinator.post('/api/releases/rel-meta-csv/metadata-import', { csv, apply, basis });
}

async function versions(): Promise<number[]> {
  const rows = await db.select().from(recordings).where(inArray(recordings.id, ids.recordingIds));
  return ids.recordingIds.map((id) => rows.find((r) => r.id === id)!.version);
}

describe('track metadata CSV', () => {
  it('exports one row per track with identifiers in their written forms', async () => {
    const csv = await exportCsv();
    const rows = Papa.parse<Record<string, string>>(csv.replace(/^\uFEFF/, ''), {
      header: true,
      skipEmptyLines: true,
    }).data;
    expect(rows).toHaveLength(3);
    expect(rows[0]).toEqual({
      position: '1',
      track_id: ids.trackIds[0],
      disc: '1',
      side: '',
      title: 'Tide, "Table" & Chart',
      version_title: '',
      artist: 'Fixture Artist',
      isrc: 'XQ-BRK-26-80001',
      iswc: 'T-034.524.680-1',
      explicit: 'no',
      credits: 'composer: Ada Lane [ISNI 0000 0001 2103 2683]; producer: Bo Reed',
    });
  });

  it('round trip: importing the export unchanged finds no changes and writes nothing', async () => {
    const before = await versions();
    const csv = await exportCsv();
    const preview = csvImportResponseSchema.parse(await (await importCsv(csv)).json());
    expect(preview).toMatchObject({ valid: true, changeCount: 0, fileErrors: [], applied: false });
    expect(preview.rows.every((r) => r.errors.length === 0 && r.changes.length === 0)).toBe(true);
    const applied = await importCsv(csv, true, preview.basis);
    expect(applied.status).toBe(200);
    expect(await versions()).toEqual(before);
  });

  it('one bad ISRC: the row error names the line and column, and nothing is written', async () => {
    const before = await versions();
    const csv = editCsv(await exportCsv(), (rows) => {
      rows[1]!.title = 'Fog Signal (Renamed)';
      rows[2]!.isrc = 'XQ-BRK-26-8000';
    });
    const preview = csvImportResponseSchema.parse(await (await importCsv(csv)).json());
    expect(preview.valid).toBe(false);
    expect(preview.rows[2]).toMatchObject({
      line: 4,
      errors: [
        {
          column: 'isrc',
          message: 'An ISRC has 12 characters (without hyphens); this one has 11.',
        },
      ],
    });
    expect(preview.rows[1]?.changes).toEqual([
      { field: 'title', before: 'Fog Signal', after: 'Fog Signal (Renamed)' },
    ]);
    const applied = await importCsv(csv, true, preview.basis);
    expect(applied.status).toBe(400);
    const error = ((await applied.json()) as { error: { message: string; issues: unknown[] } })
      .error;
    expect(error.message).toMatch(/nothing was imported/);
    expect(error.issues).toContainEqual({
      path: 'line 4.isrc',
      message: 'An ISRC has 12 characters (without hyphens); this one has 11.',
    });
    expect(await versions()).toEqual(before);
    const [fog] = await db.select().from(recordings).where(eq(recordings.id, ids.recordingIds[1]!));
    expect(fog?.title).toBe('Fog Signal');
  });

  it('fixed file: previews the changes, then writes them all with an audit event per track', async () => {
    const csv = editCsv(await exportCsv(), (rows) => {
      rows[1]!.title = 'Fog Signal (Renamed)';
      rows[2]!.isrc = 'xqbrk2680002';
      rows[2]!.credits = 'composer: Cy North; lyricist: Di Moss';
      rows[2]!.explicit = 'yes';
    });
    const preview = csvImportResponseSchema.parse(await (await importCsv(csv)).json());
    expect(preview.valid).toBe(true);
    expect(preview.changeCount).toBe(4);
    expect(preview.rows[2]?.changes).toContainEqual({
      field: 'isrc',
      before: '',
      after: 'XQ-BRK-26-80002',
    });
    const applied = csvImportResponseSchema.parse(
      await (await importCsv(csv, true, preview.basis)).json(),
    );
    expect(applied.applied).toBe(true);
    expect(applied.release?.tracks.map((t) => [t.title, t.isrc, t.explicit])).toEqual([
      ['Tide, "Table" & Chart', 'XQBRK2680001', false],
      ['Fog Signal (Renamed)', null, false],
      ['Ebb', 'XQBRK2680002', true],
    ]);
    expect(applied.release?.tracks[2]?.credits).toEqual([
      { name: 'Cy North', role: 'composer' },
      { name: 'Di Moss', role: 'lyricist' },
    ]);
    const events = await db
      .select()
      .from(auditEvents)
      .where(eq(auditEvents.action, 'track.metadata.import'));
    expect(events.filter((e) => e.releaseId === 'rel-meta-csv')).toHaveLength(2);

    // The same file again changes nothing: importing is idempotent.
    const again = csvImportResponseSchema.parse(
      await (await importCsv(csv, true, preview.basis)).json(),
    );
    expect(again.changeCount).toBe(0);
  });

  it('a recording edited between preview and import makes the import stale (409), nothing written', async () => {
    const csv = editCsv(await exportCsv(), (rows) => {
      rows[0]!.title = 'Tide Table';
      rows[2]!.title = 'Ebb (CSV)';
    });
    const preview = csvImportResponseSchema.parse(await (await importCsv(csv)).json());
    expect(preview.changeCount).toBe(2);
    const [ebb] = await db.select().from(recordings).where(eq(recordings.id, ids.recordingIds[2]!));
    const edit = await coordinator.request(
      'PATCH',
      `/api/releases/rel-meta-csv/tracks/${ids.trackIds[2]}`,
      { recordingVersion: ebb!.version, title: 'Ebb (typed in the form)' },
    );
    expect(edit.status).toBe(200);
    const applied = await importCsv(csv, true, preview.basis);
    expect(applied.status).toBe(409);
    expect(((await applied.json()) as { error: { message: string } }).error.message).toMatch(
      /changed since the preview; nothing was imported/,
    );
    const rows = await db.select().from(recordings).where(inArray(recordings.id, ids.recordingIds));
    expect(rows.map((r) => r.title).sort()).toEqual(
      ['Ebb (typed in the form)', 'Fog Signal (Renamed)', 'Tide, "Table" & Chart'].sort(),
    );
  });

  it('reports unknown columns, unknown tracks, duplicate ISRCs and bad credit roles per row', async () => {
    const bad = [
      'track_id,title,isrc,credits,colour',
      `${ids.trackIds[0]},A,XQ-BRK-26-80009,composer: X,`,
      `${ids.trackIds[1]},B,,tea-maker: Y,`,
      `${ids.trackIds[2]},C,XQBRK2680009,composer: Z,`,
      'trk-nope,D,,,',
    ].join('\n');
    const preview = csvImportResponseSchema.parse(await (await importCsv(bad)).json());
    expect(preview.valid).toBe(false);
    expect(preview.fileErrors[0]).toMatch(/Unknown column: colour/);
    expect(preview.rows[1]?.errors.map((e) => e.column)).toEqual(['credits']);
    expect(preview.rows[2]?.errors[0]?.message).toMatch(
      /Line 2 gives XQ-BRK-26-80009 to another recording/,
    );
    expect(preview.rows[3]?.errors[0]?.message).toMatch(/no track trk-nope/);
  });

  it('only metadata editors import (403 for an engineer)', async () => {
    const engineer = await signedIn(demoEmails.engineer);
    const response = await engineer.post('/api/releases/rel-meta-csv/metadata-import', {
      csv: 'track_id\n',
    });
    expect(response.status).toBe(403);
    const distributor = await signedIn(demoEmails.distributor);
    expect((await distributor.get('/api/releases/rel-meta-csv/metadata.csv')).status).toBe(404);
  });
});
