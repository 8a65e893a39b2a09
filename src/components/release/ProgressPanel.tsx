import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { z } from 'zod';
import { formatBytes } from '@/lib/api/format';
import { type WorkflowStatus, workflowStatusSchema } from '@/lib/api/workflow-schemas';
import { ApiRequestError, getJson } from '../api-client';
import {
  checksQueryKey,
  type PanelProps,
  releaseQueryKey,
  workflowQueryKey,
} from './workspace-types';

function when(iso: string): string {
  return `${iso.replace('T', ' ').slice(0, 16)} UTC`;
}

const lockedWords: Record<string, string> = {
  approved: 'approved and locked; the package is being built',
  packaged: 'approved and locked; the package is ready',
  delivered: 'delivered and acknowledged',
};

function SignoffLine({
  label,
  signoff,
}: {
  label: string;
  signoff: WorkflowStatus['signoffs']['audio'];
}) {
  if (!signoff) {
    return (
      <li data-testid={`signoff-${label.toLowerCase()}`}>
        <span aria-hidden="true">○</span> {label}: not signed off
      </li>
    );
  }
  return (
    <li
      data-testid={`signoff-${label.toLowerCase()}`}
      className={signoff.current ? 'text-pass' : 'text-warn'}
    >
      <span aria-hidden="true">{signoff.current ? '●' : '▲'}</span> {label}: signed off by{' '}
      {signoff.by}, {when(signoff.at)}
      {!signoff.current && ' — changed since; sign off again'}
    </li>
  );
}

/** Where the release stands and the signed-in role's next step: sign-offs, approval, package, sharing. */
export function ProgressPanel({ release }: PanelProps) {
  const client = useQueryClient();
  const [reason, setReason] = useState('');
  const [reopening, setReopening] = useState(false);
  const [shareWith, setShareWith] = useState('');
  const query = useQuery({
    queryKey: workflowQueryKey(release.id),
    queryFn: () =>
      getJson(`/api/releases/${encodeURIComponent(release.id)}/workflow`, workflowStatusSchema),
    refetchInterval: (q) =>
      q.state.data?.packages.some((p) => p.state === 'building') ? 1000 : false,
  });
  const base = `/api/releases/${encodeURIComponent(release.id)}`;
  const act = useMutation({
    mutationFn: async (step: { path: string; body?: unknown }) => {
      const response = await fetch(`${base}/${step.path}`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify(step.body ?? {}),
      });
      const body: unknown = await response.json().catch(() => null);
      if (!response.ok) {
        const parsed = z.object({ error: z.object({ message: z.string() }) }).safeParse(body);
        throw new ApiRequestError(
          response.status,
          'error',
          parsed.success ? parsed.data.error.message : `The server answered ${response.status}.`,
        );
      }
      return workflowStatusSchema.parse(body);
    },
    onSuccess: (status) => {
      client.setQueryData(workflowQueryKey(release.id), status);
      setReopening(false);
      setReason('');
      void client.invalidateQueries({ queryKey: releaseQueryKey(release.id) });
      void client.invalidateQueries({ queryKey: checksQueryKey(release.id) });
    },
  });
  const retry = useMutation({
    mutationFn: async (packageId: string) => {
      const response = await fetch(`/api/packages/${encodeURIComponent(packageId)}/retry`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: '{}',
      });
      if (!response.ok)
        throw new ApiRequestError(
          response.status,
          'error',
          'The package could not be built again.',
        );
    },
    onSettled: () => client.invalidateQueries({ queryKey: workflowQueryKey(release.id) }),
  });

  if (query.isPending)
    return (
      <p className="text-slate" aria-live="polite">
        Loading progress…
      </p>
    );
  if (query.isError)
    return (
      <p role="alert" className="text-fail">
        {query.error.message}
      </p>
    );
  const s = query.data;
  const version = s.version;
  const button = 'rounded px-4 py-2 font-medium disabled:opacity-60';
  const primary = `${button} bg-buoy text-white hover:bg-buoy-dark`;
  const secondary = `${button} border border-slate-light bg-white hover:bg-sand/60`;
  const blockersCount =
    s.blockers.failures + s.blockers.unwaivedWarnings.length + s.blockers.missing.length;
  const activeWaivers = s.waivers.filter((w) => w.active).length;
  const open = s.state === 'in_review' || s.state === 'draft' || s.state === 'returned';

  return (
    <div className="rounded-lg border border-mist bg-white p-4" data-testid="progress-panel">
      <p className="font-medium" data-testid="readiness">
        {s.checks.run
          ? `${s.checks.failures} failure${s.checks.failures === 1 ? '' : 's'} · ${s.checks.warnings} warning${s.checks.warnings === 1 ? '' : 's'}${activeWaivers ? ` (${activeWaivers} waived)` : ''}`
          : 'Checks not run yet'}
        {s.checks.stale && ' · checks out of date'}
        {' · '}
        {!open
          ? lockedWords[s.state]
          : s.approvable
            ? 'ready to approve'
            : `${blockersCount} thing${blockersCount === 1 ? '' : 's'} to settle before approval`}
      </p>
      <ul className="mt-2 space-y-0.5 text-sm">
        <SignoffLine label="Audio" signoff={s.signoffs.audio} />
        <SignoffLine label="Metadata" signoff={s.signoffs.metadata} />
      </ul>
      {(s.state === 'draft' || s.state === 'in_review' || s.state === 'returned') &&
        blockersCount > 0 && (
          <details className="mt-2 text-sm">
            <summary className="cursor-pointer text-slate">What stands before approval</summary>
            <ul className="mt-1 list-disc pl-5" data-testid="blockers">
              {s.blockers.failures > 0 && (
                <li>
                  {s.blockers.failures} failure{s.blockers.failures === 1 ? '' : 's'} to fix
                  (failures cannot be waived)
                </li>
              )}
              {s.blockers.unwaivedWarnings.map((w) => (
                <li key={w.key}>Warning to resolve or waive: {w.message}</li>
              ))}
              {s.blockers.missing.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          </details>
        )}

      <div className="mt-4 flex flex-wrap items-center gap-2">
        {s.actions.includes('submit_for_review') && (
          <button
            type="button"
            className={secondary}
            disabled={act.isPending}
            onClick={() => act.mutate({ path: 'submit', body: { version } })}
          >
            Send for review
          </button>
        )}
        {s.actions.includes('sign_off_audio') && (
          <button
            type="button"
            className={s.signoffs.audio?.current ? secondary : primary}
            disabled={act.isPending}
            onClick={() => act.mutate({ path: 'sign-off/audio' })}
          >
            Sign off audio
          </button>
        )}
        {s.actions.includes('sign_off_metadata') && (
          <button
            type="button"
            className={s.signoffs.metadata?.current ? secondary : primary}
            disabled={act.isPending}
            onClick={() => act.mutate({ path: 'sign-off/metadata' })}
          >
            Sign off metadata
          </button>
        )}
        {s.actions.includes('approve') && (
          <button
            type="button"
            className={primary}
            disabled={act.isPending || !s.approvable}
            title={s.approvable ? undefined : 'Settle the points listed above first'}
            onClick={() => act.mutate({ path: 'approve', body: { version } })}
          >
            Approve
          </button>
        )}
        {s.actions.includes('reopen') && !reopening && (
          <button type="button" className={secondary} onClick={() => setReopening(true)}>
            Reopen…
          </button>
        )}
      </div>
      {reopening && (
        <form
          className="mt-3 flex flex-wrap items-end gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            act.mutate({ path: 'reopen', body: { version, reason } });
          }}
        >
          <label className="flex-1 text-sm">
            <span className="block">Why reopen? (kept in the history)</span>
            <input
              className="mt-1 w-full rounded border border-slate-light px-3 py-2"
              value={reason}
              onChange={(e) => setReason(e.target.value)}
            />
          </label>
          <button type="submit" className={primary} disabled={act.isPending}>
            Reopen release
          </button>
          <button type="button" className="text-sm underline" onClick={() => setReopening(false)}>
            Cancel
          </button>
        </form>
      )}
      <div aria-live="polite">
        {act.isError && (
          <p role="alert" className="mt-2 text-sm text-fail">
            {act.error.message}
          </p>
        )}
      </div>

      {s.packages.length > 0 && (
        <div className="mt-5">
          <h3 className="text-sm font-semibold uppercase tracking-wide text-slate">Packages</h3>
          <ul className="mt-1 divide-y divide-mist text-sm" data-testid="packages">
            {s.packages.map((p) => (
              <li key={p.id} className="py-2" data-testid="package-row" data-state={p.state}>
                <span className="font-medium">Version {p.version}</span>{' '}
                {p.state === 'building' && (
                  <span className="inline-flex items-center gap-2">
                    building…
                    <progress
                      max={Math.max(1, p.totalFiles)}
                      value={p.progressFiles}
                      aria-label={`Package version ${p.version} progress`}
                    />
                    <span className="figures text-slate">
                      {p.progressFiles}/{p.totalFiles} files
                    </span>
                  </span>
                )}
                {p.state === 'ready' && (
                  <span className="figures text-slate">
                    ● ready · {formatBytes(p.sizeBytes)} · SHA-256 {p.sha256?.slice(0, 16)}…
                  </span>
                )}
                {p.state === 'failed' && (
                  <span className="text-fail">
                    ■ failed: {p.error}{' '}
                    <button
                      type="button"
                      className="underline"
                      onClick={() => retry.mutate(p.id)}
                      disabled={retry.isPending}
                    >
                      Build again
                    </button>
                  </span>
                )}
              </li>
            ))}
          </ul>
        </div>
      )}

      {(s.canShare || s.shares.length > 0) && (
        <div className="mt-5">
          <h3 className="text-sm font-semibold uppercase tracking-wide text-slate">Shared with</h3>
          {s.shares.length === 0 ? (
            <p className="text-sm text-slate">Not shared with any distributor yet.</p>
          ) : (
            <ul className="text-sm" data-testid="shares">
              {s.shares.map((sh) => (
                <li key={sh.userId}>
                  {sh.name} ({sh.email}) since {when(sh.sharedAt)}
                </li>
              ))}
            </ul>
          )}
          {s.canShare &&
            s.distributors.some((d) => !s.shares.some((sh) => sh.userId === d.userId)) && (
              <form
                className="mt-2 flex items-end gap-2"
                onSubmit={(e) => {
                  e.preventDefault();
                  if (shareWith) act.mutate({ path: 'shares', body: { userId: shareWith } });
                }}
              >
                <label className="text-sm">
                  <span className="block">Share with</span>
                  <select
                    className="mt-1 rounded border border-slate-light bg-white px-2 py-1.5"
                    value={shareWith}
                    onChange={(e) => setShareWith(e.target.value)}
                  >
                    <option value="">Choose a distributor</option>
                    {s.distributors
                      .filter((d) => !s.shares.some((sh) => sh.userId === d.userId))
                      .map((d) => (
                        <option key={d.userId} value={d.userId}>
                          {d.name} ({d.email})
                        </option>
                      ))}
                  </select>
                </label>
                <button type="submit" className={secondary} disabled={!shareWith || act.isPending}>
                  Share
                </button>
              </form>
            )}
        </div>
      )}
    </div>
  );
}
