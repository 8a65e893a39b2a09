/** A verdict as a word and a shape of its own; colour is only a second signal. */
const look = {
  pass: { shape: '●', word: 'Pass', className: 'text-pass' },
  warning: { shape: '▲', word: 'Warning', className: 'text-warn' },
  failure: { shape: '■', word: 'Failure', className: 'text-fail' },
} as const;

export function SeverityMark({ severity }: { severity: keyof typeof look }) {
  const { shape, word, className } = look[severity];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap font-medium ${className}`}>
      <span aria-hidden="true">{shape}</span>
      {word}
    </span>
  );
}
