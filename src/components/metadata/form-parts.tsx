import type { ReactNode } from 'react';
import { ApiRequestError } from '../api-client';

export const inputClass =
  'w-full rounded border border-slate-light bg-white px-2 py-1.5 text-sm text-ink focus:border-buoy aria-[invalid=true]:border-fail';
export const buttonClass =
  'rounded bg-buoy px-3 py-1.5 text-sm font-medium text-white hover:bg-buoy-dark disabled:cursor-not-allowed disabled:opacity-50';
export const quietButtonClass =
  'rounded border border-slate-light bg-white px-3 py-1.5 text-sm text-ink hover:bg-sand disabled:cursor-not-allowed disabled:opacity-50';

/** A labelled form field with its error beside it, in plain words. */
export function Field({
  id,
  label,
  error,
  hint,
  children,
  className,
}: {
  id: string;
  label: string;
  error?: string;
  hint?: string;
  children: ReactNode;
  className?: string;
}) {
  return (
    <div className={className}>
      <label htmlFor={id} className="block text-xs font-medium uppercase tracking-wide text-slate">
        {label}
      </label>
      <div className="mt-1">{children}</div>
      {hint && !error && (
        <p id={`${id}-hint`} className="mt-1 text-xs text-slate">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="mt-1 text-xs text-fail" data-testid={`${id}-error`}>
          {error}
        </p>
      )}
    </div>
  );
}

/** aria attributes tying an input to its error or hint. */
export function describedBy(id: string, error?: string, hint?: string) {
  return {
    id,
    'aria-invalid': error ? true : undefined,
    'aria-describedby': error ? `${id}-error` : hint ? `${id}-hint` : undefined,
  } as const;
}

/** Field errors from a 400 answer, keyed by the first path segment after `prefix`. */
export function fieldIssues(error: unknown): { path: string; message: string }[] {
  return error instanceof ApiRequestError && error.status === 400 ? error.issues : [];
}

export function isConflict(error: unknown): error is ApiRequestError {
  return error instanceof ApiRequestError && error.status === 409;
}

/** An error box: what happened, and what was kept. */
export function ErrorNote({ error, children }: { error: unknown; children?: ReactNode }) {
  if (!error) return null;
  const message = error instanceof Error ? error.message : 'Something went wrong.';
  return (
    <div
      role="alert"
      className="rounded border border-fail/40 bg-fail/5 p-3 text-sm text-fail"
      data-testid="metadata-error"
    >
      <p>{message}</p>
      {children}
    </div>
  );
}
