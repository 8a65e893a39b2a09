import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import {
  type CheckReportView,
  checkReportSchema,
  type FindingView,
} from '@/lib/api/checks-schemas';
import { type WorkflowStatus, workflowStatusSchema } from '@/lib/api/workflow-schemas';
import { can } from '@/lib/auth/permissions';
import { summarizeVerdicts } from '@/lib/specs/check-release';
import { RULE_TITLES } from '@/lib/specs/rule-titles';
import type { RuleId } from '@/lib/specs/schema';
import type { Finding } from '@/lib/specs/types';
import { isEditable } from '@/lib/workflow/transitions';
import { getJson, sendJson } from '../api-client';
import { checksQueryKey, type PanelProps, workflowQueryKey } from '../release/workspace-types';
import { NormalizationPreview } from './NormalizationPreview';
import { SeverityMark } from './SeverityMark';

const RELEASE_ROW = '__release__';

const levelUnits = ['LUFS', 'LU', 'dBTP', 'dBFS', 'dB'];

/** Levels to one decimal (more when one decimal would hide the difference from the limit). */
function formatValue(
  value: number | string | null,
  unit: string,
  against?: number | string | null,
): string {
  if (value === null) return '–';
  if (typeof value === 'string') return value;
  let decimals = levelUnits.includes(unit) ? 1 : Number.isInteger(value) ? 0 : 3;
  while (
    decimals < 3 &&
    typeof against === 'number' &&
    value !== against &&
    value.toFixed(decimals) === against.toFixed(decimals)
  ) {
    decimals += 1;
  }
  return `${value.toFixed(decimals)}${unit ? ` ${unit}` : ''}`;
}

function formatTime(seconds: number): string {
  const m = Math.floor(seconds / 60);
  const s = (seconds - m * 60).toFixed(3).padStart(6, '0');
  return `${String(m).padStart(2, '0')}:${s}`;
}

function ruleTitle(ruleId: string): string {
  return RULE_TITLES[ruleId as RuleId] ?? ruleId;
}

interface Filters {
  severity: 'problems' | 'all' | 'failure' | 'warning';
  profileId: string;
  trackId: string;
}

function VerdictGrid({
  report,
  waivedKeys,
  onPick,
}: {
  report: CheckReportView;
  /** Warnings waived with a reason still in force: they count as settled in the grid. */
  waivedKeys: ReadonlySet<string>;
  onPick: (trackId: string, profileId: string) => void;
}) {
  const verdicts = summarizeVerdicts(report.findings as Finding[], waivedKeys);
  const cell = new Map(verdicts.map((v) => [`${v.profileId}|${v.trackId ?? RELEASE_ROW}`, v]));
  const waivedIn = (profileId: string, trackId: string) =>
    report.findings.filter(
      (f) =>
        f.profileId === profileId &&
        (f.trackId ?? RELEASE_ROW) === trackId &&
        waivedKeys.has(f.key),
    ).length;
  const rows = [
    ...report.tracks.map((t) => ({ id: t.id, label: `${t.position}. ${t.title}` })),
    { id: RELEASE_ROW, label: 'Whole release' },
  ];
  return (
    <div className="overflow-x-auto rounded-lg border border-mist bg-white">
      <table className="w-full text-left text-sm" data-testid="verdict-grid">
        <thead className="border-b border-mist bg-sand/60 text-xs uppercase tracking-wide text-slate">
          <tr>
            <th scope="col" className="px-3 py-2 font-medium">
              Track
            </th>
            {report.profiles.map((p) => (
              <th key={p.id} scope="col" className="px-3 py-2 font-medium">
                {p.name}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((row) => (
            <tr key={row.id} className="border-b border-mist last:border-0">
              <th scope="row" className="px-3 py-2 font-medium">
                {row.label}
              </th>
              {report.profiles.map((p) => {
                const v = cell.get(`${p.id}|${row.id}`);
                if (!v) {
                  return (
                    <td key={p.id} className="px-3 py-2 text-slate">
                      –
                    </td>
                  );
                }
                const waived = waivedIn(p.id, row.id);
                const counts = [
                  v.failures ? `${v.failures} failure${v.failures > 1 ? 's' : ''}` : '',
                  v.warnings ? `${v.warnings} warning${v.warnings > 1 ? 's' : ''}` : '',
                  waived ? `${waived} waived` : '',
                ]
                  .filter(Boolean)
                  .join(', ');
                return (
                  <td key={p.id} className="px-2 py-1.5">
                    <button
                      type="button"
                      onClick={() => onPick(row.id, p.id)}
                      className="rounded px-1.5 py-1 text-left hover:bg-sand/60"
                      data-testid="verdict-cell"
                      data-verdict={v.severity}
                      aria-label={`${row.label}, ${p.name}: ${v.severity}${counts ? ` (${counts})` : ''}. Show findings`}
                    >
                      <SeverityMark severity={v.severity} />
                      {counts && <span className="ml-1 text-xs text-slate">{counts}</span>}
                    </button>
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

type WaiverView = WorkflowStatus['waivers'][number];

const metadataRuleIds = new Set([
  'isrcPresent',
  'isrcValid',
  'isrcUniqueInRelease',
  'isrcConsistentInLabel',
  'barcode',
  'requiredCredits',
  'artwork',
]);

/** Waive a warning with a reason, or show the waiver in force and offer to withdraw it. */
function WaiverControl({
  finding,
  releaseId,
  waiver,
  mayWaive,
}: {
  finding: FindingView;
  releaseId: string;
  waiver: WaiverView | undefined;
  mayWaive: boolean;
}) {
  const client = useQueryClient();
  const [open, setOpen] = useState(false);
  const [reason, setReason] = useState('');
  const refresh = (status: WorkflowStatus) => {
    client.setQueryData(workflowQueryKey(releaseId), status);
    setOpen(false);
    setReason('');
  };
  const waive = useMutation({
    mutationFn: () =>
      sendJson(
        'POST',
        `/api/releases/${encodeURIComponent(releaseId)}/waivers`,
        { findingKey: finding.key, reason },
        workflowStatusSchema,
      ),
    onSuccess: refresh,
  });
  const withdraw = useMutation({
    mutationFn: (id: string) =>
      sendJson(
        'DELETE',
        `/api/releases/${encodeURIComponent(releaseId)}/waivers/${encodeURIComponent(id)}`,
        undefined,
        workflowStatusSchema,
      ),
    onSuccess: refresh,
  });
  if (waiver?.active) {
    return (
      <p className="mt-1 text-sm" data-testid="waiver">
        <span className="font-medium">Waived</span> by {waiver.waivedBy}: “{waiver.reason}”
        {mayWaive && (
          <button
            type="button"
            className="ml-2 underline"
            onClick={() => withdraw.mutate(waiver.id)}
            disabled={withdraw.isPending}
          >
            Withdraw
          </button>
        )}
        {withdraw.isError && (
          <span role="alert" className="ml-2 text-fail">
            {withdraw.error.message}
          </span>
        )}
      </p>
    );
  }
  if (!mayWaive) return null;
  if (!open) {
    return (
      <button type="button" className="mt-1 text-sm underline" onClick={() => setOpen(true)}>
        Waive…{waiver && !waiver.active ? ' (an earlier waiver lapsed when the value changed)' : ''}
      </button>
    );
  }
  return (
    <form
      className="mt-2 flex flex-wrap items-end gap-2"
      onSubmit={(e) => {
        e.preventDefault();
        waive.mutate();
      }}
    >
      <label className="flex-1 text-sm">
        <span className="block">
          Why is this warning acceptable? (kept with the release and in the package report)
        </span>
        <input
          className="mt-1 w-full rounded border border-slate-light px-2 py-1.5"
          value={reason}
          onChange={(e) => setReason(e.target.value)}
        />
      </label>
      <button
        type="submit"
        className="rounded bg-buoy px-3 py-1.5 text-sm font-medium text-white disabled:opacity-60"
        disabled={waive.isPending}
      >
        Waive warning
      </button>
      <button type="button" className="text-sm underline" onClick={() => setOpen(false)}>
        Cancel
      </button>
      {waive.isError && (
        <p role="alert" className="basis-full text-sm text-fail">
          {waive.error.message}
        </p>
      )}
    </form>
  );
}

function FindingRow({
  finding,
  releaseId,
  trackTitle,
  workflow,
}: {
  finding: FindingView;
  releaseId: string;
  trackTitle: string;
  workflow: WorkflowStatus | undefined;
}) {
  const waiver = workflow?.waivers.find((w) => w.findingKey === finding.key);
  const editable = workflow ? isEditable(workflow.state) : false;
  const mayWaive =
    editable &&
    (metadataRuleIds.has(finding.ruleId)
      ? Boolean(workflow?.canWaive.metadata)
      : Boolean(workflow?.canWaive.audio));
  return (
    <li
      className="grid grid-cols-[7rem_1fr] gap-3 px-4 py-3"
      data-testid="finding"
      data-rule={finding.ruleId}
      data-channel={finding.channel ?? undefined}
    >
      <SeverityMark severity={finding.severity} />
      <div>
        <p>
          <span className="font-medium">{trackTitle}</span>
          <span className="text-slate"> · {ruleTitle(finding.ruleId)}</span>
          {finding.channel !== null && (
            <span className="text-slate"> · channel {finding.channel}</span>
          )}
        </p>
        <p className="mt-0.5">{finding.message}</p>
        <p className="figures mt-1 text-xs text-slate">
          measured {formatValue(finding.measured, finding.unit, finding.limit)} · limit{' '}
          {formatValue(finding.limit, finding.unit)}
          {finding.atSeconds !== undefined && finding.trackId && (
            <>
              {' · at '}
              <a
                className="text-buoy underline"
                href={`/releases/${encodeURIComponent(releaseId)}/tracks/${encodeURIComponent(finding.trackId)}?t=${finding.atSeconds.toFixed(3)}`}
              >
                {formatTime(finding.atSeconds)}
              </a>
            </>
          )}
        </p>
        {finding.severity === 'warning' && (
          <WaiverControl
            finding={finding}
            releaseId={releaseId}
            waiver={waiver}
            mayWaive={mayWaive}
          />
        )}
      </div>
    </li>
  );
}

function FindingList({
  report,
  releaseId,
  filters,
  setFilters,
  workflow,
}: {
  report: CheckReportView;
  releaseId: string;
  filters: Filters;
  setFilters: (f: Filters) => void;
  workflow: WorkflowStatus | undefined;
}) {
  const titles = new Map(report.tracks.map((t) => [t.id, `${t.position}. ${t.title}`]));
  const profileNames = new Map(report.profiles.map((p) => [p.id, p.name]));
  const shown = useMemo(
    () =>
      report.findings.filter((f) => {
        if (filters.severity === 'problems' && f.severity === 'pass') return false;
        if (
          (filters.severity === 'failure' || filters.severity === 'warning') &&
          f.severity !== filters.severity
        )
          return false;
        if (filters.profileId && f.profileId !== filters.profileId) return false;
        if (filters.trackId && (f.trackId ?? RELEASE_ROW) !== filters.trackId) return false;
        return true;
      }),
    [report.findings, filters],
  );
  const byProfile = new Map<string, FindingView[]>();
  for (const f of shown) byProfile.set(f.profileId, [...(byProfile.get(f.profileId) ?? []), f]);
  const select = 'rounded border border-slate-light bg-white px-2 py-1.5 text-sm';
  return (
    <div className="mt-6">
      <fieldset className="flex flex-wrap items-end gap-3">
        <legend className="sr-only">Filter findings</legend>
        <label className="text-sm">
          <span className="block text-xs uppercase tracking-wide text-slate">Show</span>
          <select
            className={select}
            value={filters.severity}
            onChange={(e) =>
              setFilters({ ...filters, severity: e.target.value as Filters['severity'] })
            }
          >
            <option value="problems">Failures and warnings</option>
            <option value="failure">Failures only</option>
            <option value="warning">Warnings only</option>
            <option value="all">Everything, passes included</option>
          </select>
        </label>
        <label className="text-sm">
          <span className="block text-xs uppercase tracking-wide text-slate">Profile</span>
          <select
            className={select}
            value={filters.profileId}
            onChange={(e) => setFilters({ ...filters, profileId: e.target.value })}
          >
            <option value="">All profiles</option>
            {report.profiles.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm">
          <span className="block text-xs uppercase tracking-wide text-slate">Track</span>
          <select
            className={select}
            value={filters.trackId}
            onChange={(e) => setFilters({ ...filters, trackId: e.target.value })}
          >
            <option value="">All tracks</option>
            {report.tracks.map((t) => (
              <option key={t.id} value={t.id}>
                {t.position}. {t.title}
              </option>
            ))}
            <option value={RELEASE_ROW}>Whole release</option>
          </select>
        </label>
        <p className="ml-auto text-sm text-slate" aria-live="polite" data-testid="finding-count">
          {shown.length} of {report.findings.length} findings
        </p>
      </fieldset>
      {shown.length === 0 ? (
        <p className="mt-3 rounded border border-dashed border-slate-light p-6 text-center text-slate">
          {filters.severity === 'problems'
            ? 'Nothing to fix here: every check in this selection passes.'
            : 'No findings match these filters.'}
        </p>
      ) : (
        [...byProfile.entries()].map(([profileId, list]) => (
          <section key={profileId} className="mt-4">
            <h3 className="font-medium">{profileNames.get(profileId) ?? profileId}</h3>
            <ul className="mt-1 divide-y divide-mist rounded-lg border border-mist bg-white text-sm">
              {list.map((f) => (
                <FindingRow
                  key={f.key}
                  finding={f}
                  releaseId={releaseId}
                  trackTitle={f.trackId ? (titles.get(f.trackId) ?? 'Track') : 'Whole release'}
                  workflow={workflow}
                />
              ))}
            </ul>
          </section>
        ))
      )}
    </div>
  );
}

/** Tracks × target profiles with a verdict in each cell, and the findings behind them. */
export function ChecksPanel({ release, role }: PanelProps) {
  const client = useQueryClient();
  const [filters, setFilters] = useState<Filters>({
    severity: 'problems',
    profileId: '',
    trackId: '',
  });
  const query = useQuery({
    queryKey: checksQueryKey(release.id),
    queryFn: () =>
      getJson(`/api/releases/${encodeURIComponent(release.id)}/checks`, checkReportSchema),
  });
  const run = useMutation({
    mutationFn: () =>
      sendJson(
        'POST',
        `/api/releases/${encodeURIComponent(release.id)}/checks`,
        {},
        checkReportSchema,
      ),
    onSuccess: (report) => {
      client.setQueryData(checksQueryKey(release.id), report);
      void client.invalidateQueries({ queryKey: workflowQueryKey(release.id) });
    },
  });
  const mayRun = can(role, 'check:run');
  const workflow = useQuery({
    queryKey: workflowQueryKey(release.id),
    queryFn: () =>
      getJson(`/api/releases/${encodeURIComponent(release.id)}/workflow`, workflowStatusSchema),
  });

  if (release.profiles.length === 0) {
    return (
      <p className="rounded border border-dashed border-slate-light p-6 text-center text-slate">
        No target profiles yet. The coordinator chooses them in the release details; then the checks
        can run.
      </p>
    );
  }
  const report = run.data ?? query.data;
  return (
    <div data-testid="checks-panel">
      <div className="flex flex-wrap items-center gap-4 rounded-lg border border-mist bg-white p-4">
        <div className="flex-1" aria-live="polite">
          {query.isPending && <p className="text-slate">Loading the last check run…</p>}
          {query.isError && (
            <p role="alert" className="text-fail">
              {query.error.message}
            </p>
          )}
          {report && !report.run && <p>The checks have not been run on this release yet.</p>}
          {report?.run && (
            <>
              <p className="font-medium" data-testid="check-summary">
                {report.summary.failures} failure{report.summary.failures === 1 ? '' : 's'} ·{' '}
                {report.summary.warnings} warning{report.summary.warnings === 1 ? '' : 's'} ·{' '}
                {report.summary.passes} checks clear
              </p>
              <p className="text-sm text-slate">
                Run {new Date(report.run.createdAt).toISOString().replace('T', ' ').slice(0, 16)}{' '}
                UTC
                {report.run.ranBy ? ` by ${report.run.ranBy}` : ''}
                {report.stale && (
                  <span className="ml-2 font-medium text-warn" data-testid="checks-stale">
                    ▲ The release or its files changed since; run the checks again.
                  </span>
                )}
              </p>
            </>
          )}
          {run.isError && (
            <p role="alert" className="text-sm text-fail">
              {run.error.message}
            </p>
          )}
        </div>
        {mayRun && (
          <button
            type="button"
            onClick={() => run.mutate()}
            disabled={run.isPending}
            className="rounded bg-buoy px-4 py-2 font-medium text-white hover:bg-buoy-dark disabled:opacity-60"
          >
            {run.isPending ? 'Checking…' : report?.run ? 'Run checks again' : 'Run checks'}
          </button>
        )}
      </div>
      {report?.run && (
        <>
          <div className="mt-4">
            <VerdictGrid
              report={report}
              waivedKeys={
                new Set(workflow.data?.waivers.filter((w) => w.active).map((w) => w.findingKey))
              }
              onPick={(trackId, profileId) => setFilters({ severity: 'all', trackId, profileId })}
            />
          </div>
          <FindingList
            report={report}
            releaseId={release.id}
            filters={filters}
            setFilters={setFilters}
            workflow={workflow.data}
          />
          <NormalizationPreview report={report} />
        </>
      )}
    </div>
  );
}
