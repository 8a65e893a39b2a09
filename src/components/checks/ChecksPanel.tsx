import type { PanelProps } from '../release/workspace-types';

/** Tracks × target profiles with a verdict in each cell, and the findings behind them. */
export function ChecksPanel({ release }: PanelProps) {
  return (
    <p className="rounded border border-dashed border-slate-light p-6 text-center text-slate">
      {release.profiles.length === 0
        ? 'Choose target profiles to check this release against.'
        : 'Checks have not been run yet.'}
    </p>
  );
}
