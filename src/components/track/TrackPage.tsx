import { useQuery } from '@tanstack/react-query';
import { useMemo, useRef, useState } from 'react';
import { formatIsrcForDisplay } from '@/lib/api/format';
import { type TrackDetail, trackDetailSchema } from '@/lib/api/schemas';
import { ApiRequestError, getJson } from '../api-client';
import { QueryProvider } from '../QueryProvider';
import { Section } from '../Section';
import { AnalysisStateText } from '../upload/AnalysisStateText';
import { formatBytes } from '../upload/upload-client';
import { LoudnessChart } from './LoudnessChart';
import { MeasurementReadout } from './MeasurementReadout';
import { collectMarkers, formatTime, markerShapes } from './markers';
import { Player, type PlayerHandle } from './Player';
import { VersionList } from './VersionList';
import { WaveformOverview } from './WaveformOverview';

function Analysed({ detail }: { detail: TrackDetail }) {
  const m = detail.measurements;
  const player = useRef<PlayerHandle>(null);
  const [position, setPosition] = useState<number | null>(null);
  const markers = useMemo(
    () => (m ? collectMarkers(m, detail.truePeakCeiling?.ceilingDbtp ?? null) : []),
    [m, detail.truePeakCeiling],
  );
  if (!m || !detail.current) return null;
  const seek = (seconds: number) => player.current?.playFrom(seconds);
  // A finding's link carries its time position (?t=seconds); offer to play from there.
  const requested = Number(new URLSearchParams(window.location.search).get('t'));
  const startAt =
    Number.isFinite(requested) && requested > 0 && requested <= m.format.durationSeconds
      ? requested
      : null;
  return (
    <>
      {startAt !== null && (
        <p
          className="mt-6 rounded-lg border border-mist bg-white p-3 text-sm"
          data-testid="finding-position"
        >
          You came from a finding at <span className="figures">{formatTime(startAt)}</span>.{' '}
          <button
            type="button"
            className="font-medium text-buoy underline"
            onClick={() => seek(startAt)}
          >
            Play from there
          </button>
        </p>
      )}
      <Section id="waveform" title="Waveform and findings">
        <WaveformBlock detail={detail} markers={markers} position={position} onSeek={seek} />
        {markers.length > 0 ? (
          <ul className="mt-3 space-y-1 text-sm" data-testid="finding-list">
            {markers.map((marker) => (
              <li key={`${marker.kind}-${marker.atSeconds}`}>
                <button
                  type="button"
                  className="text-left underline-offset-2 hover:underline"
                  onClick={() => seek(marker.atSeconds)}
                >
                  <span className={marker.problem ? 'text-fail' : 'text-slate'} aria-hidden="true">
                    {markerShapes[marker.kind]}
                  </span>{' '}
                  <span className="figures">{formatTime(marker.atSeconds)}</span> {marker.label}
                </button>
              </li>
            ))}
          </ul>
        ) : (
          <p className="mt-3 text-sm text-slate">
            No clipped runs, and no silence at the head or tail.
          </p>
        )}
      </Section>
      <Section id="player" title="Listen">
        <Player ref={player} audioFileId={detail.current.id} onTime={setPosition} />
      </Section>
      <Section id="loudness" title="Loudness over time">
        <LoudnessChart measurements={m} target={detail.loudnessTarget} />
      </Section>
      <Section id="readout" title="Measurements">
        <MeasurementReadout measurements={m} />
      </Section>
    </>
  );
}

function WaveformBlock({
  detail,
  markers,
  position,
  onSeek,
}: {
  detail: TrackDetail;
  markers: ReturnType<typeof collectMarkers>;
  position: number | null;
  onSeek: (seconds: number) => void;
}) {
  if (!detail.measurements) return null;
  return (
    <WaveformOverview
      measurements={detail.measurements}
      markers={markers}
      positionSeconds={position}
      onSeek={onSeek}
    />
  );
}

function TrackView({ trackId }: { trackId: string }) {
  const query = useQuery({
    queryKey: ['track', trackId],
    queryFn: () => getJson(`/api/tracks/${encodeURIComponent(trackId)}`, trackDetailSchema),
    refetchInterval: (q) => {
      const state = (q.state.data as TrackDetail | undefined)?.current?.analysisState;
      return state === 'pending' || state === 'running' ? 1000 : false;
    },
  });
  if (query.isPending) {
    return (
      <p className="py-12 text-center text-slate" aria-live="polite">
        Loading track…
      </p>
    );
  }
  if (query.isError) {
    const notFound = query.error instanceof ApiRequestError && query.error.status === 404;
    return (
      <div role="alert" className="rounded border border-fail/40 bg-fail/5 p-4 text-fail">
        <p className="font-medium">
          {notFound ? 'This track is not available to you.' : 'The track could not be loaded.'}
        </p>
        <p className="mt-1 text-sm">{query.error.message}</p>
      </div>
    );
  }
  const detail = query.data;
  const { track, current } = detail;
  return (
    <article>
      <nav aria-label="Breadcrumb" className="mb-4 text-sm text-slate">
        <a href="/releases" className="hover:underline">
          Releases
        </a>{' '}
        /{' '}
        <a href={`/releases/${encodeURIComponent(track.releaseId)}`} className="hover:underline">
          {track.releaseTitle}
        </a>
      </nav>
      <header>
        <p className="figures text-sm text-slate">
          Track {track.position} · ISRC {formatIsrcForDisplay(track.isrc)}
        </p>
        <h1 className="text-3xl font-semibold" data-testid="track-title">
          {track.title}
        </h1>
        <p className="text-lg text-ink-soft">{track.artist}</p>
        {current ? (
          <p className="mt-2 text-sm">
            <span className="break-all">{current.originalName}</span>{' '}
            <span className="figures text-slate">
              v{current.fileVersion} · {formatBytes(current.sizeBytes)}
            </span>{' '}
            · <AnalysisStateText file={current} />
          </p>
        ) : (
          <p className="mt-2 text-slate">
            No master uploaded yet. Upload one from the release page.
          </p>
        )}
      </header>
      {current?.analysisState === 'running' || current?.analysisState === 'pending' ? (
        <p className="mt-6 rounded border border-mist bg-white p-4 text-slate" aria-live="polite">
          The file is being analysed; the plots appear here when it is done. You may leave this page
          and come back.
        </p>
      ) : null}
      {current?.analysisState === 'failed' && (
        <p role="alert" className="mt-6 rounded border border-fail/40 bg-fail/5 p-4 text-fail">
          This file could not be analysed: {current.analysisError} The file is kept; upload a
          corrected master to replace it.
        </p>
      )}
      <Analysed detail={detail} />
      <Section id="versions" title="File versions">
        <VersionList versions={detail.versions} canDownload={detail.canUpload} />
      </Section>
    </article>
  );
}

/** The track page: waveform with findings, player, loudness over time, readout, versions. */
export default function TrackPage({ trackId }: { trackId: string }) {
  return (
    <QueryProvider>
      <TrackView trackId={trackId} />
    </QueryProvider>
  );
}
