import type { ReactNode } from 'react';

/** A titled section of a page; the heading labels it for assistive technology. */
export function Section({
  id,
  title,
  children,
}: {
  id: string;
  title: string;
  children: ReactNode;
}) {
  return (
    <section aria-labelledby={id} className="mt-8">
      <h2 id={id} className="mb-2 text-sm font-semibold uppercase tracking-wide text-slate">
        {title}
      </h2>
      {children}
    </section>
  );
}
