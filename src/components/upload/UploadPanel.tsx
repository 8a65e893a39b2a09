import { useQuery, useQueryClient } from '@tanstack/react-query';
import { type DragEvent, useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { type UploadStatus, uploadStatusSchema } from '@/lib/api/schemas';
import { getJson } from '../api-client';
import type { PanelProps } from '../release/workspace-types';
import { releaseQueryKey } from '../release/workspace-types';
import { useHydrated } from '../use-hydrated';
import { AnalysisStateText } from './AnalysisStateText';
import {
  formatBytes,
  guessTitle,
  sniffFile,
  startUpload,
  type UploadHandle,
} from './upload-client';

const lockedStates = new Set(['approved', 'packaged', 'delivered']);

export function uploadStatusKey(releaseId: string) {
  return ['uploads', releaseId] as const;
}

type ItemState = 'planned' | 'uploading' | 'stored' | 'failed' | 'cancelled';

interface Item {
  key: string;
  file: File;
  /** Track id to replace, or '' for a new track. */
  target: string;
  state: ItemState;
  bytesSent: number;
  message: string | null;
  handle: UploadHandle | null;
  trackId: string | null;
}

function normalizeTitle(title: string): string {
  return title
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, ' ')
    .trim();
}

function ProgressBar({ value, max, label }: { value: number; max: number; label: string }) {
  const percent = max > 0 ? Math.min(100, (value / max) * 100) : 0;
  return (
    <div
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={Math.round(percent)}
      className="h-2 w-full overflow-hidden rounded bg-mist"
    >
      <div className="h-full bg-slate transition-[width]" style={{ width: `${percent}%` }} />
    </div>
  );
}

/** Upload final masters: new tracks, or a new version of a track's file. */
export function UploadPanel({ release, role: _role }: PanelProps) {
  const hydrated = useHydrated();
  const queryClient = useQueryClient();
  const [items, setItems] = useState<Item[]>([]);
  const [dragging, setDragging] = useState(false);
  const [running, setRunning] = useState(false);
  const itemsRef = useRef(items);
  itemsRef.current = items;
  const chooser = useRef<HTMLInputElement>(null);
  const replaceChooser = useRef<HTMLInputElement>(null);
  const [replaceTarget, setReplaceTarget] = useState<string | null>(null);
  const locked = lockedStates.has(release.state);

  const uploadingNow = items.some((i) => i.state === 'uploading');
  const status = useQuery({
    queryKey: uploadStatusKey(release.id),
    queryFn: () =>
      getJson(`/api/releases/${encodeURIComponent(release.id)}/uploads`, uploadStatusSchema),
    refetchInterval: (query) => {
      const data = query.state.data as UploadStatus | undefined;
      const analysing = data?.tracks.some(
        (t) => t.current?.analysisState === 'pending' || t.current?.analysisState === 'running',
      );
      return analysing || uploadingNow ? 1000 : false;
    },
  });
  const maxBytes = status.data?.maxUploadBytes ?? null;

  // Format facts (rate, bit depth, length) are written when an analysis ends: refresh the
  // release, which the running order and the tracks table read, whenever a state changes.
  const analysisStates = (status.data?.tracks ?? [])
    .map((t) => `${t.current?.id}:${t.current?.analysisState}`)
    .join(',');
  const seenStates = useRef(analysisStates);
  useEffect(() => {
    if (seenStates.current === analysisStates) return;
    seenStates.current = analysisStates;
    void queryClient.invalidateQueries({ queryKey: releaseQueryKey(release.id) });
  }, [analysisStates, queryClient, release.id]);

  const update = useCallback((key: string, patch: Partial<Item>) => {
    setItems((list) => list.map((i) => (i.key === key ? { ...i, ...patch } : i)));
  }, []);

  const refresh = useCallback(() => {
    void queryClient.invalidateQueries({ queryKey: uploadStatusKey(release.id) });
    void queryClient.invalidateQueries({ queryKey: releaseQueryKey(release.id) });
  }, [queryClient, release.id]);

  const addFiles = useCallback(
    (files: File[], forcedTarget?: string) => {
      const tracks = status.data?.tracks ?? [];
      const planned = files.map<Item>((file) => {
        const title = normalizeTitle(guessTitle(file.name));
        const match = tracks.find((t) => normalizeTitle(t.title) === title);
        return {
          key: crypto.randomUUID(),
          file,
          target: forcedTarget ?? match?.id ?? '',
          state: 'planned',
          bytesSent: 0,
          message: null,
          handle: null,
          trackId: null,
        };
      });
      setItems((list) => [...list.filter((i) => i.state !== 'stored'), ...planned]);
      return planned;
    },
    [status.data],
  );

  const sendOne = useCallback(
    async (item: Item): Promise<void> => {
      const refusal =
        maxBytes !== null && item.file.size > maxBytes
          ? `This file is ${formatBytes(item.file.size)}; the largest upload allowed is ${formatBytes(maxBytes)}.`
          : await sniffFile(item.file);
      if (refusal) {
        update(item.key, { state: 'failed', message: `${refusal} Nothing was sent.` });
        return;
      }
      const handle = startUpload({
        releaseId: release.id,
        file: item.file,
        trackId: item.target || null,
        onProgress: (bytesSent) => update(item.key, { bytesSent }),
      });
      update(item.key, { state: 'uploading', handle, bytesSent: 0, message: null });
      const outcome = await handle.done;
      if (outcome.ok) {
        update(item.key, {
          state: 'stored',
          bytesSent: item.file.size,
          handle: null,
          trackId: outcome.result.trackId,
          message: `as version ${outcome.result.fileVersion}; its analysis shows in the list below.`,
        });
      } else {
        update(item.key, {
          state: outcome.cancelled ? 'cancelled' : 'failed',
          handle: null,
          message: outcome.message,
        });
      }
      refresh();
    },
    [maxBytes, refresh, release.id, update],
  );

  const sendPlanned = useCallback(
    async (only?: Item[]) => {
      setRunning(true);
      try {
        // One file at a time: the connection is the bottleneck, and a queue is easy to follow.
        const queue = only ?? itemsRef.current.filter((i) => i.state === 'planned');
        for (const item of queue) {
          const latest = itemsRef.current.find((i) => i.key === item.key) ?? item;
          if (latest.state === 'cancelled') continue;
          await sendOne(latest);
        }
      } finally {
        setRunning(false);
      }
    },
    [sendOne],
  );

  useEffect(() => {
    const warn = (event: BeforeUnloadEvent) => {
      if (itemsRef.current.some((i) => i.state === 'uploading')) event.preventDefault();
    };
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, []);

  const onDrop = (event: DragEvent<HTMLDivElement>) => {
    event.preventDefault();
    setDragging(false);
    if (locked) return;
    addFiles(Array.from(event.dataTransfer.files));
  };

  const planned = items.filter((i) => i.state === 'planned');
  const active = items.filter((i) => i.state !== 'planned');
  const totals = useMemo(() => {
    const counted = items.filter((i) => i.state === 'uploading' || i.state === 'stored');
    return {
      sent: counted.reduce((n, i) => n + i.bytesSent, 0),
      total: counted.reduce((n, i) => n + i.file.size, 0),
    };
  }, [items]);

  const tracks = status.data?.tracks ?? [];

  return (
    <div className="space-y-4" data-testid="upload-panel">
      {locked ? (
        <p className="rounded border border-mist bg-white p-4 text-slate">
          This release is {release.state}; its files are locked. Reopen it to upload new masters.
        </p>
      ) : (
        // biome-ignore lint/a11y/noStaticElementInteractions: the drop target; the button inside is the keyboard path
        <div
          onDragOver={(event) => {
            event.preventDefault();
            setDragging(true);
          }}
          onDragLeave={() => setDragging(false)}
          onDrop={onDrop}
          className={`rounded border-2 border-dashed p-6 text-center ${dragging ? 'border-buoy bg-sand' : 'border-slate-light bg-white'}`}
        >
          <p className="text-ink-soft">
            Drop WAV, BWF, RF64 or AIFF masters here, or{' '}
            <button
              type="button"
              disabled={!hydrated}
              onClick={() => chooser.current?.click()}
              className="font-medium text-buoy-dark underline underline-offset-2 disabled:opacity-50"
            >
              choose files
            </button>
            .
          </p>
          <p className="mt-1 text-sm text-slate">
            A file whose name matches a track title replaces that track's file; others become new
            tracks at the end of the running order.
            {maxBytes !== null && ` Up to ${formatBytes(maxBytes)} per file.`}
          </p>
          <input
            ref={chooser}
            type="file"
            multiple
            accept=".wav,.wave,.bwf,.rf64,.aif,.aiff,.aifc,audio/wav,audio/x-wav,audio/aiff"
            className="sr-only"
            aria-label="Choose master files"
            data-testid="upload-input"
            onChange={(event) => {
              addFiles(Array.from(event.currentTarget.files ?? []));
              event.currentTarget.value = '';
            }}
          />
          <input
            ref={replaceChooser}
            type="file"
            accept=".wav,.wave,.bwf,.rf64,.aif,.aiff,.aifc,audio/wav,audio/x-wav,audio/aiff"
            className="sr-only"
            tabIndex={-1}
            aria-hidden="true"
            data-testid="replace-input"
            onChange={(event) => {
              const file = event.currentTarget.files?.[0];
              event.currentTarget.value = '';
              if (!file || !replaceTarget) return;
              const added = addFiles([file], replaceTarget);
              void sendPlanned(added);
            }}
          />
        </div>
      )}

      {planned.length > 0 && (
        <div className="rounded border border-mist bg-white p-4">
          <h3 className="font-medium">Ready to upload</h3>
          <ul className="mt-2 divide-y divide-mist">
            {planned.map((item) => (
              <li key={item.key} className="flex flex-wrap items-center gap-3 py-2">
                <span className="min-w-48 flex-1 truncate">{item.file.name}</span>
                <span className="figures text-sm text-slate">{formatBytes(item.file.size)}</span>
                <label className="text-sm">
                  <span className="sr-only">Where {item.file.name} goes</span>
                  <select
                    value={item.target}
                    onChange={(event) => update(item.key, { target: event.currentTarget.value })}
                    className="rounded border border-slate-light bg-white px-2 py-1"
                  >
                    <option value="">New track: {guessTitle(item.file.name)}</option>
                    {tracks.map((t) => (
                      <option key={t.id} value={t.id}>
                        Replace {t.position}. {t.title}
                      </option>
                    ))}
                  </select>
                </label>
                <button
                  type="button"
                  className="text-sm text-slate underline"
                  onClick={() => setItems((list) => list.filter((i) => i.key !== item.key))}
                >
                  Remove
                </button>
              </li>
            ))}
          </ul>
          <button
            type="button"
            disabled={!hydrated || running}
            onClick={() => void sendPlanned()}
            className="mt-3 rounded bg-buoy px-4 py-2 font-medium text-white hover:bg-buoy-dark disabled:opacity-50"
          >
            Upload {planned.length} {planned.length === 1 ? 'file' : 'files'}
          </button>
        </div>
      )}

      {active.length > 0 && (
        <div className="rounded border border-mist bg-white p-4" aria-live="polite">
          {totals.total > 0 && (
            <div className="mb-3">
              <p className="figures text-sm text-slate">
                All files: {formatBytes(totals.sent)} of {formatBytes(totals.total)}
              </p>
              <ProgressBar value={totals.sent} max={totals.total} label="All files" />
            </div>
          )}
          <ul className="space-y-3">
            {active.map((item) => (
              <li key={item.key} data-testid="upload-item" data-state={item.state}>
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <span className="truncate font-medium">{item.file.name}</span>
                  <span className="figures text-sm text-slate">
                    {formatBytes(item.bytesSent)} of {formatBytes(item.file.size)}
                  </span>
                </div>
                <ProgressBar value={item.bytesSent} max={item.file.size} label={item.file.name} />
                <div className="mt-1 flex flex-wrap items-center gap-3 text-sm">
                  <span className={item.state === 'failed' ? 'text-fail' : 'text-slate'}>
                    {item.state === 'uploading' && 'Uploading…'}
                    {item.state === 'stored' && '● Stored '}
                    {item.state === 'failed' && '■ Not stored. '}
                    {item.state === 'cancelled' && 'Cancelled. '}
                    {item.message}
                  </span>
                  {item.state === 'uploading' && (
                    <button
                      type="button"
                      className="underline"
                      onClick={() => item.handle?.cancel()}
                    >
                      Cancel
                    </button>
                  )}
                  {(item.state === 'failed' || item.state === 'cancelled') && (
                    <button
                      type="button"
                      className="underline"
                      disabled={running}
                      onClick={() => {
                        update(item.key, { state: 'planned', message: null, bytesSent: 0 });
                        void sendPlanned([{ ...item, state: 'planned' }]);
                      }}
                    >
                      Retry
                    </button>
                  )}
                  {item.state === 'stored' && item.trackId && (
                    <a
                      className="underline"
                      href={`/releases/${encodeURIComponent(release.id)}/tracks/${encodeURIComponent(item.trackId)}`}
                    >
                      Open track
                    </a>
                  )}
                </div>
              </li>
            ))}
          </ul>
        </div>
      )}

      <div className="overflow-x-auto rounded border border-mist bg-white">
        {status.isPending ? (
          <p className="p-4 text-slate">Loading files…</p>
        ) : status.isError ? (
          <p role="alert" className="p-4 text-fail">
            The files could not be loaded: {status.error.message}
          </p>
        ) : tracks.length === 0 ? (
          <p className="p-4 text-slate">
            No tracks yet. Drop the album's masters above: each file becomes a track.
          </p>
        ) : (
          <table className="w-full text-left text-sm">
            <caption className="sr-only">Master file of each track</caption>
            <thead className="border-b border-mist text-slate">
              <tr>
                <th className="px-3 py-2 font-medium">#</th>
                <th className="px-3 py-2 font-medium">Track</th>
                <th className="px-3 py-2 font-medium">Master file</th>
                <th className="px-3 py-2 font-medium">Analysis</th>
                <th className="px-3 py-2 font-medium">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {tracks.map((t) => (
                <tr
                  key={t.id}
                  className="border-b border-mist last:border-0"
                  data-testid="file-row"
                >
                  <td className="figures px-3 py-2">{t.position}</td>
                  <td className="px-3 py-2">
                    <a
                      className="underline underline-offset-2"
                      href={`/releases/${encodeURIComponent(release.id)}/tracks/${encodeURIComponent(t.id)}`}
                    >
                      {t.title}
                    </a>
                  </td>
                  <td className="px-3 py-2">
                    {t.current ? (
                      <>
                        <span className="break-all">{t.current.originalName}</span>{' '}
                        <span className="figures text-slate">
                          v{t.current.fileVersion}
                          {t.versionCount > 1 && ` (${t.versionCount} versions)`}
                        </span>
                      </>
                    ) : (
                      <span className="text-slate">No file yet</span>
                    )}
                  </td>
                  <td className="px-3 py-2" data-testid="analysis-state">
                    {t.current ? <AnalysisStateText file={t.current} /> : '–'}
                  </td>
                  <td className="px-3 py-2 text-right">
                    {!locked && (
                      <button
                        type="button"
                        disabled={!hydrated}
                        className="underline disabled:opacity-50"
                        onClick={() => {
                          setReplaceTarget(t.id);
                          replaceChooser.current?.click();
                        }}
                      >
                        {t.current ? 'Replace file' : 'Add file'}
                        <span className="sr-only"> of {t.title}</span>
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </div>
    </div>
  );
}
