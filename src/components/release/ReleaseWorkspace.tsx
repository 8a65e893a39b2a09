import { useQuery } from '@tanstack/react-query';
import { releaseDetailSchema } from '@/lib/api/schemas';
import { can, type Role } from '@/lib/auth/permissions';
import { ApiRequestError, getJson } from '../api-client';
import { ChecksPanel } from '../checks/ChecksPanel';
import { ReleaseFactsPanel } from '../metadata/ReleaseFactsPanel';
import { TracksPanel } from '../metadata/TracksPanel';
import { QueryProvider } from '../QueryProvider';
import { ReleaseStateBadge } from '../ReleaseStateBadge';
import { Section } from '../Section';
import { UploadPanel } from '../upload/UploadPanel';
import { HistoryPanel } from './HistoryPanel';
import { ProgressPanel } from './ProgressPanel';
import { RunningOrder } from './RunningOrder';
import { releaseQueryKey } from './workspace-types';

function Workspace({ releaseId, role }: { releaseId: string; role: Role }) {
  const query = useQuery({
    queryKey: releaseQueryKey(releaseId),
    queryFn: () => getJson(`/api/releases/${encodeURIComponent(releaseId)}`, releaseDetailSchema),
  });
  if (query.isPending) {
    return (
      <p className="py-12 text-center text-slate" aria-live="polite">
        Loading release…
      </p>
    );
  }
  if (query.isError) {
    const notFound = query.error instanceof ApiRequestError && query.error.status === 404;
    return (
      <div role="alert" className="rounded border border-fail/40 bg-fail/5 p-4 text-fail">
        <p className="font-medium">
          {notFound ? 'This release is not available to you.' : 'The release could not be loaded.'}
        </p>
        <p className="mt-1 text-sm">{query.error.message}</p>
        <a href="/releases" className="mt-3 inline-block underline">
          Back to releases
        </a>
      </div>
    );
  }
  const release = query.data;
  const panel = { release, role };
  return (
    <article>
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <p className="text-sm text-slate">{release.labelName}</p>
          <h1 className="text-3xl font-semibold" data-testid="release-title">
            {release.title}
          </h1>
          <p className="text-lg text-ink-soft">{release.artist}</p>
        </div>
        <ReleaseStateBadge state={release.state} />
      </header>
      {can(role, 'finding:read') && (
        <Section id="progress" title="Progress">
          <ProgressPanel {...panel} />
        </Section>
      )}
      <div className="mt-6">
        <ReleaseFactsPanel {...panel} />
      </div>
      <Section id="running-order" title="Running order">
        <RunningOrder release={release} />
      </Section>
      <Section id="tracks" title="Tracks">
        <TracksPanel {...panel} />
      </Section>
      {can(role, 'audio:upload') && (
        <Section id="upload" title="Upload masters">
          <UploadPanel {...panel} />
        </Section>
      )}
      {role !== 'distributor' && (
        <Section id="checks" title="Checks">
          <ChecksPanel {...panel} />
        </Section>
      )}
      {can(role, 'audit:read') && (
        <Section id="history" title="History">
          <HistoryPanel releaseId={release.id} />
        </Section>
      )}
    </article>
  );
}

/** The release page: header, running order, tracks, checks — each panel in its own file. */
export default function ReleaseWorkspace({ releaseId, role }: { releaseId: string; role: Role }) {
  return (
    <QueryProvider>
      <Workspace releaseId={releaseId} role={role} />
    </QueryProvider>
  );
}
