import { and, eq } from 'drizzle-orm';
import { type CsvImportResponse, trackFieldsSchema } from '../../api/metadata-schemas';
import type { Track } from '../../api/schemas';
import type { Database } from '../../db/client';
import { recordings, tracks } from '../../db/schema';
import { formatIsrc, parseIsrc } from '../../identifiers/isrc';
import { recordAudit } from '../audit';
import { ApiError } from '../errors';
import type { Actor } from '../route';
import {
  assertRecordingsUnlocked,
  assertUnlocked,
  loadReleaseRow,
  reloadRelease,
  withWriteLock,
} from './common';
import {
  type CsvColumn,
  formatCreditsCell,
  parseCreditsCell,
  parseTrackCsv,
  parseYesNo,
} from './csv-format';
import { assertIsrcFreeFor } from './isrc-guard';
import { reserveOwnIsrc } from './track-metadata';

/** Form field → CSV column, for placing validation errors. */
const columnOf: Record<string, CsvColumn> = {
  title: 'title',
  versionTitle: 'version_title',
  artist: 'artist',
  isrc: 'isrc',
  iswc: 'iswc',
  explicit: 'explicit',
  credits: 'credits',
  disc: 'disc',
  side: 'side',
};

export type Candidate = {
  title: string;
  versionTitle: string | null;
  artist: string;
  isrc: string | null;
  iswc: string | null;
  explicit: boolean;
  credits: { name: string; role: string; isni?: string | null }[];
  disc: number;
  side: string | null;
};

interface PlannedRow {
  track: Track;
  candidate: Candidate;
  changed: (keyof Candidate)[];
}

function cellOf(field: keyof Candidate, value: Candidate[keyof Candidate]): string {
  if (value === null || value === undefined) return '';
  if (field === 'explicit') return value ? 'yes' : 'no';
  if (field === 'credits') return formatCreditsCell(value as Candidate['credits']);
  if (field === 'isrc' && typeof value === 'string' && parseIsrc(value).ok)
    return formatIsrc(value);
  return String(value);
}

export function currentOf(t: Track): Candidate {
  return {
    title: t.title,
    versionTitle: t.versionTitle,
    artist: t.artist,
    isrc: t.isrc,
    iswc: t.iswc,
    explicit: t.explicit,
    credits: t.credits.map((c) => ({
      name: c.name,
      role: c.role,
      ...(c.isni ? { isni: c.isni } : {}),
    })),
    disc: t.disc,
    side: t.side,
  };
}

type RowError = { column: string | null; message: string };

/**
 * One CSV row read against the track's current values, without the database: the values it
 * would give the track (cells left out keep theirs), checked with the track form's schema, or
 * what is wrong with it. Never throws on any cell text.
 */
export function checkCsvRow(
  values: Partial<Record<CsvColumn, string>>,
  current: Candidate,
): { candidate: Candidate | null; errors: RowError[] } {
  const errors: RowError[] = [];
  const input: Record<string, unknown> = {
    title: values.title ?? current.title,
    versionTitle: values.version_title ?? current.versionTitle,
    artist: values.artist ?? current.artist,
    isrc: values.isrc ?? current.isrc,
    iswc: values.iswc ?? current.iswc,
    explicit: current.explicit,
    credits: current.credits,
    disc: current.disc,
    side: values.side ?? current.side,
  };
  if (values.explicit !== undefined) {
    const explicit = parseYesNo(values.explicit);
    if (explicit === null) errors.push({ column: 'explicit', message: 'Write yes or no.' });
    else input.explicit = explicit;
  }
  if (values.disc !== undefined) {
    const disc = values.disc === '' ? 1 : Number(values.disc);
    input.disc = disc;
  }
  if (values.credits !== undefined) {
    const credits = parseCreditsCell(values.credits);
    if (!credits.ok) errors.push({ column: 'credits', message: credits.message });
    else input.credits = credits.credits.map((c) => ({ ...c, isni: c.isni ?? null }));
  }
  const checked = trackFieldsSchema.safeParse(input);
  if (!checked.success) {
    for (const issue of checked.error.issues) {
      const [field, index] = issue.path;
      const column = columnOf[String(field)] ?? null;
      const where = field === 'credits' && typeof index === 'number' ? `Credit ${index + 1}: ` : '';
      errors.push({ column, message: `${where}${issue.message}` });
    }
    return { candidate: null, errors };
  }
  const candidate: Candidate = {
    ...checked.data,
    credits: checked.data.credits.map((c) => ({
      name: c.name,
      role: c.role,
      ...(c.isni ? { isni: c.isni } : {}),
    })),
  };
  return { candidate, errors };
}

/** The fields whose values differ between what a row would write and what is stored. */
export function changedFields(candidate: Candidate, current: Candidate): (keyof Candidate)[] {
  return (Object.keys(candidate) as (keyof Candidate)[]).filter(
    (k) => JSON.stringify(candidate[k] ?? null) !== JSON.stringify(current[k] ?? null),
  );
}

/**
 * Reads a track CSV against the release: what each row would change and what is wrong with
 * it. With `apply`, writes every change in one transaction, and only when no row has an
 * error and no recording changed since the preview (`basis`).
 */
export async function importTrackCsv(
  db: Database,
  actor: Actor,
  releaseId: string,
  request: { csv: string; apply: boolean; basis?: Record<string, number> },
): Promise<CsvImportResponse> {
  const releaseRow = await loadReleaseRow(db, actor, releaseId);
  assertUnlocked(releaseRow);
  const release = await reloadRelease(db, actor, releaseId);
  const parsed = parseTrackCsv(request.csv);
  const byId = new Map(release.tracks.map((t) => [t.id, t]));
  const seenTracks = new Map<string, number>();
  const isrcOwners = new Map<string, { recordingId: string; line: number }>();
  const rows: CsvImportResponse['rows'] = [];
  const plan: PlannedRow[] = [];

  for (const { line, values } of parsed.rows) {
    const errors: { column: string | null; message: string }[] = [];
    const trackId = values.track_id ?? '';
    const track = byId.get(trackId);
    const row = {
      line,
      trackId: trackId || null,
      position: track?.position ?? (Number(values.position) || null),
      title: values.title ?? track?.title ?? '',
      changes: [] as { field: string; before: string; after: string }[],
      errors,
    };
    rows.push(row);
    if (!track) {
      errors.push({
        column: 'track_id',
        message: trackId
          ? `This release has no track ${trackId}; export the CSV again to get the current ids.`
          : 'The track_id is empty; keep the ids from the exported file.',
      });
      continue;
    }
    const earlier = seenTracks.get(track.id);
    if (earlier) {
      errors.push({ column: 'track_id', message: `Line ${earlier} already has this track.` });
      continue;
    }
    seenTracks.set(track.id, line);

    const current = currentOf(track);
    const checked = checkCsvRow(values, current);
    errors.push(...checked.errors);
    if (!checked.candidate) continue;
    const { candidate } = checked;
    if (candidate.isrc) {
      const owner = isrcOwners.get(candidate.isrc);
      if (owner && owner.recordingId !== track.recordingId) {
        errors.push({
          column: 'isrc',
          message: `Line ${owner.line} gives ${formatIsrc(candidate.isrc)} to another recording; one ISRC identifies one recording.`,
        });
      } else {
        isrcOwners.set(candidate.isrc, { recordingId: track.recordingId, line });
        if (candidate.isrc !== current.isrc) {
          try {
            await assertIsrcFreeFor(db, actor.organizationId, track.recordingId, candidate.isrc);
          } catch (error) {
            if (!(error instanceof ApiError)) throw error;
            errors.push({ column: 'isrc', message: error.message });
          }
        }
      }
    }
    const changed = changedFields(candidate, current);
    row.changes = changed.map((field) => ({
      field: columnOf[field] ?? field,
      before: cellOf(field, current[field]),
      after: cellOf(field, candidate[field]),
    }));
    if (errors.length === 0 && changed.length > 0) plan.push({ track, candidate, changed });
  }

  const valid = parsed.fileErrors.length === 0 && rows.every((r) => r.errors.length === 0);
  const basis = Object.fromEntries(
    plan.map((p) => [p.track.recordingId, p.track.recordingVersion]),
  );
  const changeCount = rows.reduce((n, r) => n + r.changes.length, 0);
  const preview = { valid, fileErrors: parsed.fileErrors, rows, changeCount, basis };
  if (!request.apply) return { applied: false, ...preview };

  if (!valid) {
    throw new ApiError(
      'invalid_request',
      'The CSV has errors; nothing was imported. Fix the rows listed and import again.',
      [
        ...parsed.fileErrors.map((message) => ({ path: 'csv', message })),
        ...rows.flatMap((r) =>
          r.errors.map((e) => ({
            path: `line ${r.line}${e.column ? `.${e.column}` : ''}`,
            message: e.message,
          })),
        ),
      ],
    );
  }
  const seenBasis = request.basis ?? {};
  const stale = plan.find((p) => seenBasis[p.track.recordingId] !== p.track.recordingVersion);
  if (stale) {
    throw new ApiError(
      'conflict',
      `“${stale.track.title}” changed since the preview; nothing was imported. Preview the file again.`,
    );
  }
  await withWriteLock(() =>
    db.transaction(async (tx) => {
      const fresh = await loadReleaseRow(tx, actor, releaseId);
      assertUnlocked(fresh);
      await assertRecordingsUnlocked(
        tx,
        plan.map((p) => p.track.recordingId),
      );
      for (const { track, candidate, changed } of plan) {
        const recordingFields: Partial<Candidate> = {};
        const trackFields: { disc?: number; side?: string | null } = {};
        for (const field of changed) {
          if (field === 'disc') trackFields.disc = candidate.disc;
          else if (field === 'side') trackFields.side = candidate.side;
          else (recordingFields as Record<string, unknown>)[field] = candidate[field];
        }
        if (recordingFields.isrc) {
          await assertIsrcFreeFor(
            tx,
            actor.organizationId,
            track.recordingId,
            recordingFields.isrc,
          );
          await reserveOwnIsrc(tx, actor, track.recordingId, recordingFields.isrc);
        }
        const updated = await tx
          .update(recordings)
          .set({ ...recordingFields, version: track.recordingVersion + 1, updatedAt: new Date() })
          .where(
            and(
              eq(recordings.id, track.recordingId),
              eq(recordings.version, track.recordingVersion),
            ),
          )
          .returning({ id: recordings.id });
        if (updated.length === 0) {
          throw new ApiError(
            'conflict',
            `“${track.title}” changed since the preview; nothing was imported. Preview the file again.`,
          );
        }
        if (Object.keys(trackFields).length > 0) {
          await tx
            .update(tracks)
            .set({ ...trackFields, updatedAt: new Date() })
            .where(eq(tracks.id, track.id));
        }
        const current = currentOf(track);
        await recordAudit(tx, {
          organizationId: actor.organizationId,
          releaseId,
          actorId: actor.userId,
          action: 'track.metadata.import',
          before: {
            trackId: track.id,
            title: track.title,
            ...Object.fromEntries(changed.map((f) => [f, current[f]])),
          },
          after: {
            trackId: track.id,
            title: track.title,
            ...Object.fromEntries(changed.map((f) => [f, candidate[f]])),
          },
        });
      }
    }),
  );
  return { applied: true, ...preview, release: await reloadRelease(db, actor, releaseId) };
}
