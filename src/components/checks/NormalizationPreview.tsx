import type { CheckReportView, NormalizationPreviewView } from '@/lib/api/checks-schemas';

function gain(db: number | null): string {
  if (db === null) return '–';
  const sign = db > 0 ? '+' : db < 0 ? '−' : '±';
  return `${sign}${Math.abs(db).toFixed(1)} dB`;
}

function Cell({ level }: { level: NormalizationPreviewView['album'] }) {
  return (
    <td className="figures px-3 py-1.5 text-right">
      {gain(level.gainDb)}
      {level.exceedsCeiling && (
        <span
          className="ml-2 font-sans text-xs font-medium text-warn"
          title="Raised this much, the true peak passes the ceiling"
        >
          ▲ peak {level.truePeakAfterDbtp?.toFixed(1)} dBTP
        </span>
      )}
    </td>
  );
}

/** The gain loudness-normalising players would apply to each track and to the album. */
export function NormalizationPreview({ report }: { report: CheckReportView }) {
  const previews = report.normalization;
  if (previews.length === 0 || report.tracks.length === 0) return null;
  const ceiling = previews[0]?.ceilingDbtp ?? -1;
  return (
    <details className="mt-6 rounded-lg border border-mist bg-white" data-testid="normalization">
      <summary className="cursor-pointer px-4 py-3 font-medium">
        How loudness-normalising players will play it
      </summary>
      <div className="overflow-x-auto px-4 pb-4">
        <p className="text-sm text-slate">
          The gain a player applies to reach its reference level. ▲ marks a quiet master that,
          raised that far, would pass {ceiling.toFixed(1)} dBTP; most players then limit or hold
          back the gain.
        </p>
        <table className="mt-2 w-full text-left text-sm">
          <thead className="border-b border-mist text-xs uppercase tracking-wide text-slate">
            <tr>
              <th scope="col" className="px-3 py-1.5 font-medium">
                Track
              </th>
              <th scope="col" className="px-3 py-1.5 text-right font-medium">
                Loudness
              </th>
              {previews.map((p) => (
                <th
                  key={p.referenceLufs}
                  scope="col"
                  className="px-3 py-1.5 text-right font-medium"
                >
                  at {p.referenceLufs} LUFS <span className="normal-case">({p.source})</span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {report.tracks.map((t) => (
              <tr key={t.id} className="border-b border-mist">
                <th scope="row" className="px-3 py-1.5 font-medium">
                  {t.position}. {t.title}
                </th>
                <td className="figures px-3 py-1.5 text-right">
                  {previews[0]?.tracks
                    .find((x) => x.trackId === t.id)
                    ?.integratedLufs?.toFixed(1) ?? '–'}{' '}
                  LUFS
                </td>
                {previews.map((p) => {
                  const level = p.tracks.find((x) => x.trackId === t.id);
                  return level ? (
                    <Cell key={p.referenceLufs} level={level} />
                  ) : (
                    <td key={p.referenceLufs} />
                  );
                })}
              </tr>
            ))}
            <tr>
              <th scope="row" className="px-3 py-1.5 font-medium">
                Album (one gain for all)
              </th>
              <td className="figures px-3 py-1.5 text-right">
                {previews[0]?.album.integratedLufs?.toFixed(1) ?? '–'} LUFS
              </td>
              {previews.map((p) => (
                <Cell key={p.referenceLufs} level={p.album} />
              ))}
            </tr>
          </tbody>
        </table>
      </div>
    </details>
  );
}
