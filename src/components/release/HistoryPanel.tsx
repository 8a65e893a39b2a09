import { useQuery } from '@tanstack/react-query';
import { type AuditEventView, auditResponseSchema } from '@/lib/api/workflow-schemas';
import { getJson } from '../api-client';

const labels: Record<string, string> = {
  'release.created': 'created the release',
  'release.submitted': 'sent it for review',
  'release.approved': 'approved it',
  'release.reopened': 'reopened it',
  'release.shared': 'shared it',
  'signoff.audio': 'signed off the audio',
  'signoff.metadata': 'signed off the metadata',
  'waiver.added': 'waived a warning',
  'waiver.revoked': 'withdrew a waiver',
  'checks.run': 'ran the checks',
  'package.started': 'started a package',
  'package.ready': 'package ready',
  'package.failed': 'package failed',
  'package.downloaded': 'downloaded the package',
  'delivery.acknowledged': 'acknowledged the delivery',
  'delivery.returned': 'returned the release',
  'release.metadata.update': 'changed the release details',
  'track.metadata.update': 'changed a track',
  'track.isrc.update': 'changed an ISRC',
  'track.credits.update': 'changed credits',
  'track.isrc.allocate': 'allocated ISRCs',
  'track.metadata.import': 'imported track metadata from CSV',
  'release.order.update': 'changed the running order',
  'release.gaps.update': 'changed the gaps',
  'release.artwork.upload': 'uploaded cover art',
  'registrant.update': 'set the ISRC registrant code',
  'profile.created': 'made a delivery profile',
  'profile.updated': 'changed a delivery profile',
  'profile.deleted': 'deleted a delivery profile',
  'member.invited': 'invited a member',
  'member.joined': 'joined the label',
};

function describe(value: unknown): string {
  if (value === null || value === undefined) return '';
  const text = JSON.stringify(value);
  return text.length > 160 ? `${text.slice(0, 157)}…` : text;
}

/** One audit event as a sentence with its before → after. */
export function AuditRow({
  event,
  showRelease = false,
}: {
  event: AuditEventView;
  showRelease?: boolean;
}) {
  const before = describe(event.before);
  const after = describe(event.after);
  return (
    <li
      className="grid grid-cols-[10rem_1fr] gap-3 px-4 py-2 text-sm"
      data-testid="audit-row"
      data-action={event.action}
    >
      <time className="figures text-slate" dateTime={event.createdAt}>
        {event.createdAt.replace('T', ' ').slice(0, 19)}
      </time>
      <div>
        <p>
          <span className="font-medium">{event.actor ?? 'Quayside'}</span>{' '}
          {labels[event.action] ?? event.action}
          {showRelease && event.releaseTitle && (
            <>
              {' · '}
              <a className="underline" href={`/releases/${event.releaseId}`}>
                {event.releaseTitle}
              </a>
            </>
          )}
        </p>
        {(before || after) && (
          <p className="figures break-all text-xs text-slate">
            {before && <>before {before} </>}
            {after && <>after {after}</>}
          </p>
        )}
      </div>
    </li>
  );
}

/** The release's audit trail, newest first. */
export function HistoryPanel({ releaseId }: { releaseId: string }) {
  const query = useQuery({
    queryKey: ['history', releaseId],
    queryFn: () =>
      getJson(`/api/releases/${encodeURIComponent(releaseId)}/history`, auditResponseSchema),
  });
  if (query.isPending) return <p className="text-slate">Loading history…</p>;
  if (query.isError)
    return (
      <p role="alert" className="text-fail">
        {query.error.message}
      </p>
    );
  if (query.data.events.length === 0)
    return <p className="text-slate">Nothing has happened to this release yet.</p>;
  return (
    <details className="rounded-lg border border-mist bg-white">
      <summary className="cursor-pointer px-4 py-3 font-medium">
        {query.data.events.length} {query.data.events.length === 1 ? 'event' : 'events'}, newest
        first
      </summary>
      <ul className="divide-y divide-mist border-t border-mist">
        {query.data.events.map((e) => (
          <AuditRow key={e.id} event={e} />
        ))}
      </ul>
    </details>
  );
}
