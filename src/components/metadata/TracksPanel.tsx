import {
  type Announcements,
  closestCenter,
  DndContext,
  type DragEndEvent,
  KeyboardSensor,
  PointerSensor,
  useSensor,
  useSensors,
} from '@dnd-kit/core';
import {
  arrayMove,
  SortableContext,
  sortableKeyboardCoordinates,
  useSortable,
  verticalListSortingStrategy,
} from '@dnd-kit/sortable';
import { useQueryClient } from '@tanstack/react-query';
import { type KeyboardEvent, useEffect, useState } from 'react';
import { formatDuration } from '@/lib/api/format';
import { displayIsrc, FRAMES_PER_SECOND, secondsToFrames } from '@/lib/api/metadata-schemas';
import type { ReleaseDetail, Track } from '@/lib/api/schemas';
import { can } from '@/lib/auth/permissions';
import { parseIsrc } from '@/lib/identifiers/isrc';
import type { PanelProps } from '../release/workspace-types';
import { releaseQueryKey } from '../release/workspace-types';
import { useHydrated } from '../use-hydrated';
import { CsvPanel } from './CsvPanel';
import { ErrorNote, isConflict, quietButtonClass } from './form-parts';
import { isLockedState, lockedNotice } from './locking';
import { TrackEditor } from './TrackEditor';
import { useIsrcAllocation, useLayoutUpdate, useTrackPatch } from './track-api';

const analysisWords = {
  pending: '○ waiting to analyse',
  running: '◐ analysing',
  failed: '■ analysis failed',
  done: '',
} as const;

/** The track list: order (drag or keyboard), titles, ISRCs, gaps; inline edits by role. */
export function TracksPanel({ release: r, role }: PanelProps) {
  const locked = isLockedState(r.state);
  const mayEditMetadata = can(role, 'metadata:edit') && !locked;
  const mayEditOrder = can(role, 'order:edit') && !locked;
  const [editingId, setEditingId] = useState<string | null>(null);
  const allocate = useIsrcAllocation(r.id);
  const missingIsrc = r.tracks.filter((t) => !t.isrc).length;
  const editing = r.tracks.find((t) => t.id === editingId) ?? null;

  if (r.tracks.length === 0) {
    return (
      <p className="rounded border border-dashed border-slate-light p-6 text-center text-slate">
        No tracks yet. The engineer adds tracks by uploading the final masters.
      </p>
    );
  }
  return (
    <div>
      {locked && (can(role, 'metadata:edit') || can(role, 'order:edit')) && (
        <p className="mb-2 text-sm text-slate">{lockedNotice(r.state)}</p>
      )}
      {mayEditMetadata && (
        <div className="mb-2 flex flex-wrap items-center gap-3">
          <button
            type="button"
            className={quietButtonClass}
            disabled={missingIsrc === 0 || allocate.isPending}
            onClick={() => allocate.mutate(undefined)}
          >
            Allocate ISRCs to {missingIsrc} track{missingIsrc === 1 ? '' : 's'} without one
          </button>
          <span className="text-xs text-slate" aria-live="polite">
            {allocate.isSuccess && allocate.data.allocated.length > 0
              ? `Allocated ${allocate.data.allocated.map((a) => displayIsrc(a.isrc)).join(', ')}.`
              : ''}
          </span>
        </div>
      )}
      {allocate.isError && (
        <div className="mb-2">
          <ErrorNote error={allocate.error} />
        </div>
      )}
      <TrackTable
        release={r}
        mayEditMetadata={mayEditMetadata}
        mayEditOrder={mayEditOrder}
        onEdit={setEditingId}
      />
      {editing && mayEditMetadata && (
        <TrackEditor
          key={editing.id}
          release={r}
          track={editing}
          onClose={() => setEditingId(null)}
        />
      )}
      {can(role, 'metadata:edit') && <CsvPanel release={r} locked={locked} />}
    </div>
  );
}

function TrackTable({
  release: r,
  mayEditMetadata,
  mayEditOrder,
  onEdit,
}: {
  release: ReleaseDetail;
  mayEditMetadata: boolean;
  mayEditOrder: boolean;
  onEdit: (trackId: string) => void;
}) {
  const hydrated = useHydrated();
  const client = useQueryClient();
  const layout = useLayoutUpdate(r.id);
  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 4 } }),
    useSensor(KeyboardSensor, { coordinateGetter: sortableKeyboardCoordinates }),
  );
  const titleOf = (id: unknown) => r.tracks.find((t) => t.id === id)?.title ?? 'track';
  const positionOf = (id: unknown) => r.tracks.findIndex((t) => t.id === id) + 1;
  const announcements: Announcements = {
    onDragStart: ({ active }) =>
      `Picked up “${titleOf(active.id)}”, position ${positionOf(active.id)} of ${r.tracks.length}. Use the arrow keys to move, space to drop, escape to cancel.`,
    onDragOver: ({ active, over }) =>
      over
        ? `“${titleOf(active.id)}” is over position ${positionOf(over.id)}.`
        : `“${titleOf(active.id)}” is no longer over a position.`,
    onDragEnd: ({ active, over }) =>
      over
        ? `Dropped “${titleOf(active.id)}” at position ${positionOf(over.id)}.`
        : `Dropped “${titleOf(active.id)}”.`,
    onDragCancel: ({ active }) => `Cancelled; “${titleOf(active.id)}” stays where it was.`,
  };

  const sendLayout = (tracks: Track[]) =>
    layout.mutate({
      version: r.version,
      tracks: tracks.map((t) => ({ id: t.id, gapBeforeFrames: t.gapBeforeFrames })),
    });

  const onDragEnd = ({ active, over }: DragEndEvent) => {
    if (!over || active.id === over.id) return;
    const from = r.tracks.findIndex((t) => t.id === active.id);
    const to = r.tracks.findIndex((t) => t.id === over.id);
    if (from < 0 || to < 0) return;
    sendLayout(arrayMove(r.tracks, from, to));
  };

  const setGap = (trackId: string, frames: number) =>
    sendLayout(r.tracks.map((t) => (t.id === trackId ? { ...t, gapBeforeFrames: frames } : t)));

  return (
    <>
      {layout.isError && (
        <div className="mb-2">
          <ErrorNote error={layout.error}>
            {isConflict(layout.error) && (
              <button
                type="button"
                className={`${quietButtonClass} mt-2`}
                onClick={() => {
                  layout.reset();
                  void client.invalidateQueries({ queryKey: releaseQueryKey(r.id) });
                }}
              >
                Reload the running order
              </button>
            )}
          </ErrorNote>
        </div>
      )}
      <div className="overflow-x-auto rounded-lg border border-mist bg-white">
        <DndContext
          sensors={sensors}
          collisionDetection={closestCenter}
          onDragEnd={onDragEnd}
          accessibility={{ announcements }}
        >
          <table className="w-full text-left text-sm" data-testid="track-table">
            <thead className="border-b border-mist bg-sand/60 text-xs uppercase tracking-wide text-slate">
              <tr>
                {mayEditOrder && (
                  <th scope="col" className="w-8 px-2 py-2">
                    <span className="sr-only">Reorder</span>
                  </th>
                )}
                <th scope="col" className="px-3 py-2 text-right font-medium">
                  #
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Side/disc
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Title
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  ISRC
                </th>
                <th scope="col" className="px-3 py-2 text-right font-medium">
                  Gap before
                </th>
                <th scope="col" className="px-3 py-2 text-right font-medium">
                  Length
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Master file
                </th>
                {mayEditMetadata && (
                  <th scope="col" className="px-3 py-2">
                    <span className="sr-only">Actions</span>
                  </th>
                )}
              </tr>
            </thead>
            <SortableContext
              items={r.tracks.map((t) => t.id)}
              strategy={verticalListSortingStrategy}
            >
              <tbody>
                {r.tracks.map((t) => (
                  <TrackRow
                    key={t.id}
                    release={r}
                    track={t}
                    mayEditMetadata={mayEditMetadata && hydrated}
                    mayEditOrder={mayEditOrder && hydrated}
                    showOrderColumn={mayEditOrder}
                    showActions={mayEditMetadata}
                    onEdit={onEdit}
                    onGap={setGap}
                  />
                ))}
              </tbody>
            </SortableContext>
          </table>
        </DndContext>
      </div>
    </>
  );
}

function TrackRow({
  release: r,
  track: t,
  mayEditMetadata,
  mayEditOrder,
  showOrderColumn,
  showActions,
  onEdit,
  onGap,
}: {
  release: ReleaseDetail;
  track: Track;
  mayEditMetadata: boolean;
  mayEditOrder: boolean;
  showOrderColumn: boolean;
  showActions: boolean;
  onEdit: (id: string) => void;
  onGap: (trackId: string, frames: number) => void;
}) {
  const { attributes, listeners, setNodeRef, setActivatorNodeRef, transform, transition } =
    useSortable({ id: t.id, disabled: !mayEditOrder });
  const patch = useTrackPatch(r.id);
  const style = {
    transform: transform ? `translate3d(0, ${Math.round(transform.y)}px, 0)` : undefined,
    transition,
  };
  const composers = t.credits.filter((c) => c.role === 'composer').map((c) => c.name);
  return (
    <>
      <tr
        ref={setNodeRef}
        style={style}
        className="border-b border-mist bg-white last:border-0"
        data-testid="track-row"
        data-track-id={t.id}
      >
        {showOrderColumn && (
          <td className="px-2 py-2">
            <button
              type="button"
              ref={setActivatorNodeRef}
              {...attributes}
              {...listeners}
              disabled={!mayEditOrder}
              aria-label={`Move “${t.title}” (position ${t.position})`}
              className="cursor-grab rounded px-1 text-slate hover:bg-sand"
              data-testid="reorder-handle"
            >
              ⠿
            </button>
          </td>
        )}
        <td className="figures px-3 py-2 text-right">{t.position}</td>
        <td className="figures px-3 py-2">{t.side ? `Side ${t.side}` : `Disc ${t.disc}`}</td>
        <td className="px-3 py-2">
          {mayEditMetadata ? (
            <InlineText
              label={`Title of track ${t.position}`}
              value={t.title}
              testId="inline-title"
              onCommit={(title) =>
                patch.mutate({
                  trackId: t.id,
                  recordingVersion: t.recordingVersion,
                  fields: { title },
                })
              }
            />
          ) : (
            <div className="font-medium" data-testid="track-title">
              {t.title}
            </div>
          )}
          <div className="text-xs text-slate">
            {t.versionTitle ? `${t.versionTitle} · ` : ''}
            {t.artist} · {composers.join(', ') || 'No composer credited'}
          </div>
        </td>
        <td className="figures px-3 py-2">
          {mayEditMetadata ? (
            <InlineText
              label={`ISRC of track ${t.position}`}
              value={displayIsrc(t.isrc)}
              placeholder="CC-XXX-YY-NNNNN"
              mono
              testId="inline-isrc"
              validate={(v) => {
                if (!v.trim()) return null;
                const parsed = parseIsrc(v);
                return parsed.ok ? null : parsed.message;
              }}
              onCommit={(isrc) =>
                patch.mutate({
                  trackId: t.id,
                  recordingVersion: t.recordingVersion,
                  fields: { isrc: isrc.trim() === '' ? null : isrc },
                })
              }
            />
          ) : (
            <span data-testid="track-isrc">{displayIsrc(t.isrc) || '–'}</span>
          )}
        </td>
        <td className="figures px-3 py-2 text-right">
          {mayEditOrder ? (
            <InlineText
              label={`Gap before track ${t.position}, seconds`}
              value={(t.gapBeforeFrames / FRAMES_PER_SECOND).toFixed(3)}
              mono
              align="right"
              suffix="s"
              testId="inline-gap"
              validate={(v) => {
                const n = Number(v.trim().replace(',', '.'));
                if (v.trim() === '' || !Number.isFinite(n)) return 'Enter seconds, e.g. 2.000';
                if (n < 0) return 'A gap cannot be negative';
                if (n > 600) return 'A gap is at most 600 seconds';
                return null;
              }}
              onCommit={(v) => onGap(t.id, secondsToFrames(Number(v.trim().replace(',', '.'))))}
            />
          ) : (
            `${(t.gapBeforeFrames / FRAMES_PER_SECOND).toFixed(3)} s`
          )}
        </td>
        <td className="figures px-3 py-2 text-right">{formatDuration(t.audio?.durationSeconds)}</td>
        <td className="px-3 py-2 text-xs">
          {t.audio ? (
            <>
              <a
                className="block truncate underline-offset-2 hover:underline"
                href={`/releases/${encodeURIComponent(r.id)}/tracks/${encodeURIComponent(t.id)}`}
                title="Open the track: plots, measurements, versions, player"
              >
                {t.audio.originalName}
              </a>
              <div className="figures text-slate">
                {t.audio.sampleRateHz ? `${(t.audio.sampleRateHz / 1000).toFixed(1)} kHz` : '?'} ·{' '}
                {t.audio.bitsPerSample ?? '?'}-bit ·{' '}
                {t.audio.channels === 2 ? 'stereo' : `${t.audio.channels} ch`}
                {t.audio.analysisState === 'done'
                  ? ''
                  : ` · ${analysisWords[t.audio.analysisState]}`}
              </div>
            </>
          ) : (
            <span className="text-slate">No file yet</span>
          )}
        </td>
        {showActions && (
          <td className="px-3 py-2 text-right">
            <button
              type="button"
              className="text-sm underline underline-offset-2 disabled:opacity-50"
              disabled={!mayEditMetadata}
              onClick={() => onEdit(t.id)}
              aria-label={`Edit “${t.title}”`}
            >
              Edit
            </button>
          </td>
        )}
      </tr>
      {patch.isError && (
        <tr>
          <td colSpan={9} className="px-3 pb-2">
            <ErrorNote error={patch.error}>
              <button
                type="button"
                className={`${quietButtonClass} mt-2`}
                onClick={() => patch.reset()}
              >
                Dismiss
              </button>
            </ErrorNote>
          </td>
        </tr>
      )}
    </>
  );
}

/**
 * A cell that reads as text and edits in place: Enter or leaving the field saves, Escape
 * puts the saved value back. Errors from `validate` show beside it and nothing is sent.
 */
function InlineText({
  label,
  value,
  onCommit,
  validate,
  placeholder,
  mono = false,
  align = 'left',
  suffix,
  testId,
}: {
  label: string;
  value: string;
  onCommit: (value: string) => void;
  validate?: (value: string) => string | null;
  placeholder?: string;
  mono?: boolean;
  align?: 'left' | 'right';
  suffix?: string;
  testId?: string;
}) {
  const [draft, setDraft] = useState(value);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    setDraft(value);
    setError(null);
  }, [value]);
  const commit = () => {
    if (draft === value) return;
    const problem = validate?.(draft) ?? null;
    setError(problem);
    if (!problem) onCommit(draft);
  };
  const onKeyDown = (event: KeyboardEvent<HTMLInputElement>) => {
    if (event.key === 'Enter') {
      event.preventDefault();
      commit();
    } else if (event.key === 'Escape') {
      setDraft(value);
      setError(null);
    }
  };
  return (
    <div>
      <div className="flex items-center gap-1">
        <input
          aria-label={label}
          value={draft}
          placeholder={placeholder}
          onChange={(e) => setDraft(e.target.value)}
          onBlur={commit}
          onKeyDown={onKeyDown}
          aria-invalid={error ? true : undefined}
          data-testid={testId}
          className={`w-full min-w-0 rounded border border-transparent bg-transparent px-1 py-0.5 hover:border-mist focus:border-buoy focus:bg-white aria-[invalid=true]:border-fail ${mono ? 'figures' : 'font-medium'} ${align === 'right' ? 'text-right' : ''}`}
        />
        {suffix && <span className="text-slate">{suffix}</span>}
      </div>
      {error && (
        <p className="mt-1 max-w-xs text-left text-xs font-normal text-fail" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}
