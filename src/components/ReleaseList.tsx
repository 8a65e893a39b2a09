import { useQuery } from '@tanstack/react-query';
import { formatDate, formatDuration } from '@/lib/api/format';
import { releaseListSchema } from '@/lib/api/schemas';
import { getJson } from './api-client';
import { QueryProvider } from './QueryProvider';
import { ReleaseStateBadge } from './ReleaseStateBadge';

function ReleaseTable() {
  const query = useQuery({
    queryKey: ['releases'],
    queryFn: () => getJson('/api/releases', releaseListSchema),
  });

  if (query.isPending) {
    return (
      <p className="py-12 text-center text-slate" aria-live="polite">
        Loading releases…
      </p>
    );
  }
  if (query.isError) {
    return (
      <div role="alert" className="rounded border border-fail/40 bg-fail/5 p-4 text-fail">
        <p className="font-medium">The release list could not be loaded.</p>
        <p className="mt-1 text-sm">{query.error.message} Nothing was changed.</p>
        <button type="button" className="mt-3 underline" onClick={() => query.refetch()}>
          Try again
        </button>
      </div>
    );
  }
  const { releases } = query.data;
  if (releases.length === 0) {
    return (
      <div
        className="rounded-lg border border-dashed border-slate-light p-10 text-center"
        data-testid="releases-empty"
      >
        <p className="font-medium">No releases to show yet.</p>
        <p className="mt-1 text-sm text-slate">
          Releases appear here when your label creates them, or — for distributors — when a label
          shares one with you.
        </p>
      </div>
    );
  }
  return (
    <div className="overflow-x-auto rounded-lg border border-mist bg-white">
      <table className="w-full text-left text-sm" data-testid="release-table">
        <thead className="border-b border-mist bg-sand/60 text-xs uppercase tracking-wide text-slate">
          <tr>
            <th scope="col" className="px-4 py-3 font-medium">
              Release
            </th>
            <th scope="col" className="px-4 py-3 font-medium">
              Cat. no.
            </th>
            <th scope="col" className="px-4 py-3 font-medium">
              State
            </th>
            <th scope="col" className="px-4 py-3 font-medium">
              Target profiles
            </th>
            <th scope="col" className="px-4 py-3 text-right font-medium">
              Tracks
            </th>
            <th scope="col" className="px-4 py-3 text-right font-medium">
              Running time
            </th>
            <th scope="col" className="px-4 py-3 font-medium">
              Release date
            </th>
          </tr>
        </thead>
        <tbody>
          {releases.map((r) => (
            <tr
              key={r.id}
              className="border-b border-mist last:border-0 hover:bg-paper"
              data-testid="release-row"
            >
              <td className="px-4 py-3">
                <a
                  href={`/releases/${r.id}`}
                  className="font-medium text-ink underline-offset-2 hover:underline"
                >
                  {r.title}
                </a>
                <div className="text-slate">{r.artist}</div>
              </td>
              <td className="figures whitespace-nowrap px-4 py-3">{r.catalogueNumber ?? '–'}</td>
              <td className="px-4 py-3">
                <ReleaseStateBadge state={r.state} />
              </td>
              <td className="px-4 py-3">
                {r.profiles.length === 0 ? (
                  <span className="text-slate">None chosen</span>
                ) : (
                  <ul className="flex flex-wrap gap-1">
                    {r.profiles.map((p) => (
                      <li key={p.id} className="rounded bg-mist px-2 py-0.5 text-xs">
                        {p.name}
                      </li>
                    ))}
                  </ul>
                )}
              </td>
              <td className="figures px-4 py-3 text-right">{r.trackCount}</td>
              <td className="figures px-4 py-3 text-right">
                {formatDuration(r.totalDurationSeconds)}
              </td>
              <td className="figures px-4 py-3">{formatDate(r.releaseDate)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export default function ReleaseList() {
  return (
    <QueryProvider>
      <ReleaseTable />
    </QueryProvider>
  );
}
