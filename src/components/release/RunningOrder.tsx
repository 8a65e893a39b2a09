import { formatDuration } from '@/lib/api/format';
import type { ReleaseDetail } from '@/lib/api/schemas';

/** The whole programme drawn to scale: each track as long as its audio, gaps as gaps,
 * one row per vinyl side or disc. */
export function RunningOrder({ release }: { release: ReleaseDetail }) {
  const rows = new Map<string, ReleaseDetail['tracks']>();
  for (const t of release.tracks) {
    const key = t.side ? `Side ${t.side}` : `Disc ${t.disc}`;
    rows.set(key, [...(rows.get(key) ?? []), t]);
  }
  const lengthOf = (tracks: ReleaseDetail['tracks']) =>
    tracks.reduce((sum, t) => sum + t.gapBeforeFrames / 75 + (t.audio?.durationSeconds ?? 0), 0);
  const longest = Math.max(0, ...[...rows.values()].map(lengthOf));
  if (longest <= 0) return null;
  return (
    <div className="space-y-2">
      {[...rows.entries()].map(([label, tracks]) => {
        const total = lengthOf(tracks);
        return (
          <div key={label} className="flex items-center gap-3">
            {rows.size > 1 && (
              <span className="figures w-14 shrink-0 text-xs text-slate">{label}</span>
            )}
            <div
              className="flex h-10 overflow-hidden rounded border border-mist bg-sand/50"
              style={{ width: `${(total / longest) * 100}%` }}
              role="img"
              aria-label={`${label}: ${tracks.length} tracks, ${formatDuration(total)} including gaps`}
            >
              {tracks.map((t) => {
                const gap = t.gapBeforeFrames / 75;
                const seconds = t.audio?.durationSeconds ?? 0;
                return (
                  <div
                    key={t.id}
                    className="flex h-full"
                    style={{ width: `${((gap + seconds) / total) * 100}%` }}
                  >
                    <div style={{ width: `${(gap / (gap + seconds || 1)) * 100}%` }} />
                    <div
                      className={`flex h-full flex-1 items-center overflow-hidden border-x border-paper px-1.5 text-xs text-sand ${t.position % 2 ? 'bg-ink-soft' : 'bg-slate'}`}
                      title={`${t.position}. ${t.title} (${formatDuration(seconds)})`}
                    >
                      <span className="truncate">
                        {t.position}. {t.title}
                      </span>
                    </div>
                  </div>
                );
              })}
            </div>
            <span className="figures shrink-0 text-xs text-slate">{formatDuration(total)}</span>
          </div>
        );
      })}
    </div>
  );
}
