import { useQuery } from '@tanstack/react-query';
import {
  formatDate,
  formatDuration,
  formatFramesAsSeconds,
  formatIsrcForDisplay,
} from '@/lib/api/format';
import { type ReleaseDetail, releaseDetailSchema } from '@/lib/api/schemas';
import { ApiRequestError, getJson } from './api-client';
import { QueryProvider } from './QueryProvider';
import { ReleaseStateBadge } from './ReleaseStateBadge';

function Fact({ label, value, mono = false }: { label: string; value: string; mono?: boolean }) {
  return (
    <div>
      <dt className="text-xs uppercase tracking-wide text-slate">{label}</dt>
      <dd className={mono ? 'figures' : undefined}>{value}</dd>
    </div>
  );
}

/** The whole programme drawn to scale: each track as long as its audio, gaps as gaps. */
function RunningOrder({ release }: { release: ReleaseDetail }) {
  const items = release.tracks.map((t) => ({
    id: t.id,
    title: t.title,
    gap: t.gapBeforeFrames / 75,
    seconds: t.audio?.durationSeconds ?? 0,
  }));
  const total = items.reduce((sum, i) => sum + i.gap + i.seconds, 0);
  if (total <= 0) return null;
  return (
    <section aria-labelledby="running-order" className="mt-8">
      <h2 id="running-order" className="text-sm font-semibold uppercase tracking-wide text-slate">
        Running order
      </h2>
      <div
        className="mt-2 flex h-10 w-full overflow-hidden rounded border border-mist bg-sand/50"
        role="img"
        aria-label={`${items.length} tracks, ${formatDuration(total)} including gaps`}
      >
        {items.map((i, index) => (
          <div
            key={i.id}
            className="flex h-full"
            style={{ width: `${((i.gap + i.seconds) / total) * 100}%` }}
          >
            <div style={{ width: `${(i.gap / (i.gap + i.seconds || 1)) * 100}%` }} />
            <div
              className={`flex h-full flex-1 items-center overflow-hidden border-x border-paper px-1.5 text-xs text-sand ${index % 2 ? 'bg-slate' : 'bg-ink-soft'}`}
              title={`${index + 1}. ${i.title} (${formatDuration(i.seconds)})`}
            >
              <span className="truncate">
                {index + 1}. {i.title}
              </span>
            </div>
          </div>
        ))}
      </div>
      <p className="figures mt-1 text-right text-xs text-slate">
        Total {formatDuration(total)} including gaps
      </p>
    </section>
  );
}

function ReleaseBody({ releaseId }: { releaseId: string }) {
  const query = useQuery({
    queryKey: ['release', releaseId],
    queryFn: () => getJson(`/api/releases/${encodeURIComponent(releaseId)}`, releaseDetailSchema),
  });
  if (query.isPending)
    return (
      <p className="py-12 text-center text-slate" aria-live="polite">
        Loading release…
      </p>
    );
  if (query.isError) {
    const notFound = query.error instanceof ApiRequestError && query.error.status === 404;
    return (
      <div role="alert" className="rounded border border-fail/40 bg-fail/5 p-4 text-fail">
        <p className="font-medium">
          {notFound ? 'This release is not available to you.' : 'The release could not be loaded.'}
        </p>
        <p className="mt-1 text-sm">{query.error.message}</p>
        <a href="/releases" className="mt-3 inline-block underline">
          Back to releases
        </a>
      </div>
    );
  }
  const r = query.data;
  return (
    <article>
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <p className="text-sm text-slate">{r.labelName}</p>
          <h1 className="text-3xl font-semibold" data-testid="release-title">
            {r.title}
          </h1>
          <p className="text-lg text-ink-soft">{r.artist}</p>
        </div>
        <ReleaseStateBadge state={r.state} />
      </header>
      <dl className="mt-6 grid grid-cols-2 gap-4 rounded-lg border border-mist bg-white p-4 sm:grid-cols-4">
        <Fact label="Catalogue number" value={r.catalogueNumber ?? '–'} mono />
        <Fact label="UPC/EAN" value={r.upcEan ?? 'Not entered'} mono />
        <Fact label="Release date" value={formatDate(r.releaseDate)} mono />
        <Fact label="Genre" value={r.genre ?? '–'} />
        <Fact label="℗ line" value={r.pLine ?? '–'} />
        <Fact label="© line" value={r.cLine ?? '–'} />
        <Fact
          label="Target profiles"
          value={r.profiles.map((p) => p.name).join(' · ') || 'None chosen'}
        />
        <Fact label="Running time" value={formatDuration(r.totalDurationSeconds)} mono />
      </dl>
      <RunningOrder release={r} />
      <section aria-labelledby="tracks" className="mt-8">
        <h2 id="tracks" className="text-sm font-semibold uppercase tracking-wide text-slate">
          Tracks
        </h2>
        {r.tracks.length === 0 ? (
          <p className="mt-2 rounded border border-dashed border-slate-light p-6 text-center text-slate">
            No tracks yet. The engineer adds tracks by uploading the final masters.
          </p>
        ) : (
          <div className="mt-2 overflow-x-auto rounded-lg border border-mist bg-white">
            <table className="w-full text-left text-sm" data-testid="track-table">
              <thead className="border-b border-mist bg-sand/60 text-xs uppercase tracking-wide text-slate">
                <tr>
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
                </tr>
              </thead>
              <tbody>
                {r.tracks.map((t) => (
                  <tr
                    key={t.id}
                    className="border-b border-mist last:border-0"
                    data-testid="track-row"
                  >
                    <td className="figures px-3 py-2 text-right">{t.position}</td>
                    <td className="figures px-3 py-2">
                      {t.side ? `Side ${t.side}` : `Disc ${t.disc}`}
                    </td>
                    <td className="px-3 py-2">
                      <div className="font-medium">
                        {t.title}
                        {t.versionTitle ? ` (${t.versionTitle})` : ''}
                      </div>
                      <div className="text-xs text-slate">
                        {t.credits
                          .filter((c) => c.role === 'composer')
                          .map((c) => c.name)
                          .join(', ') || 'No composer credited'}
                      </div>
                    </td>
                    <td className="figures px-3 py-2">{formatIsrcForDisplay(t.isrc)}</td>
                    <td className="figures px-3 py-2 text-right">
                      {formatFramesAsSeconds(t.gapBeforeFrames)}
                    </td>
                    <td className="figures px-3 py-2 text-right">
                      {formatDuration(t.audio?.durationSeconds)}
                    </td>
                    <td className="px-3 py-2 text-xs">
                      {t.audio ? (
                        <>
                          <div className="truncate">{t.audio.originalName}</div>
                          <div className="figures text-slate">
                            {t.audio.sampleRateHz
                              ? `${(t.audio.sampleRateHz / 1000).toFixed(1)} kHz`
                              : '?'}{' '}
                            · {t.audio.bitsPerSample ?? '?'}-bit ·{' '}
                            {t.audio.channels === 2 ? 'stereo' : `${t.audio.channels} ch`}
                          </div>
                        </>
                      ) : (
                        <span className="text-slate">No file yet</span>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
    </article>
  );
}

export default function ReleaseView({ releaseId }: { releaseId: string }) {
  return (
    <QueryProvider>
      <ReleaseBody releaseId={releaseId} />
    </QueryProvider>
  );
}
