import { formatDuration, formatFramesAsSeconds, formatIsrcForDisplay } from '@/lib/api/format';
import type { PanelProps } from '../release/workspace-types';

/** The track list: order, side/disc, titles, ISRCs, gaps and the master file of each. */
export function TracksPanel({ release: r }: PanelProps) {
  if (r.tracks.length === 0) {
    return (
      <p className="rounded border border-dashed border-slate-light p-6 text-center text-slate">
        No tracks yet. The engineer adds tracks by uploading the final masters.
      </p>
    );
  }
  return (
    <div className="overflow-x-auto rounded-lg border border-mist bg-white">
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
            <tr key={t.id} className="border-b border-mist last:border-0" data-testid="track-row">
              <td className="figures px-3 py-2 text-right">{t.position}</td>
              <td className="figures px-3 py-2">{t.side ? `Side ${t.side}` : `Disc ${t.disc}`}</td>
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
  );
}
