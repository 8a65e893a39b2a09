import { type ReleaseStateValue, releaseStateLabels } from '@/lib/api/schemas';

/** Each state has a word and a shape of its own, so colour is never the only signal. */
const look: Record<ReleaseStateValue, { shape: string; className: string }> = {
  draft: { shape: '○', className: 'border-slate-light text-slate' },
  in_review: { shape: '◐', className: 'border-warn/50 text-warn bg-warn/5' },
  approved: { shape: '●', className: 'border-pass/50 text-pass bg-pass/5' },
  packaged: { shape: '■', className: 'border-ink/40 text-ink bg-mist' },
  delivered: { shape: '▲', className: 'border-pass text-white bg-pass' },
  returned: { shape: '◆', className: 'border-fail/50 text-fail bg-fail/5' },
};

export function ReleaseStateBadge({ state }: { state: ReleaseStateValue }) {
  const { shape, className } = look[state];
  return (
    <span
      className={`inline-flex items-center gap-1.5 whitespace-nowrap rounded-full border px-2.5 py-0.5 text-xs font-medium ${className}`}
      data-state={state}
    >
      <span aria-hidden="true">{shape}</span>
      {releaseStateLabels[state]}
    </span>
  );
}
