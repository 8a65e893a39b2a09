import { formatDate, formatDuration } from '@/lib/api/format';
import type { PanelProps } from '../release/workspace-types';

function Fact({ label, value, mono = false }: { label: string; value: string; mono?: boolean }) {
  return (
    <div>
      <dt className="text-xs uppercase tracking-wide text-slate">{label}</dt>
      <dd className={mono ? 'figures' : undefined}>{value}</dd>
    </div>
  );
}

/** Release-level metadata: identifiers, dates, ℗/© lines, target profiles. */
export function ReleaseFactsPanel({ release: r }: PanelProps) {
  return (
    <dl className="grid grid-cols-2 gap-4 rounded-lg border border-mist bg-white p-4 sm:grid-cols-4">
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
  );
}
