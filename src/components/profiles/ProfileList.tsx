import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { profileEntrySchema, profileListSchema } from '@/lib/api/checks-schemas';
import { ApiRequestError, getJson, sendJson } from '../api-client';
import { QueryProvider } from '../QueryProvider';

function CopyForm({
  sourceId,
  sourceName,
  onDone,
}: {
  sourceId: string;
  sourceName: string;
  onDone: () => void;
}) {
  const [name, setName] = useState(`${sourceName} (ours)`);
  const copy = useMutation({
    mutationFn: () =>
      sendJson('POST', '/api/profiles', { name, copyOf: sourceId }, profileEntrySchema),
    onSuccess: (entry) => window.location.assign(`/profiles/${entry.profile.id}`),
  });
  return (
    <form
      className="mt-2 flex flex-wrap items-center gap-2"
      onSubmit={(e) => {
        e.preventDefault();
        copy.mutate();
      }}
    >
      <label htmlFor={`copy-${sourceId}`} className="text-sm">
        Name of the copy
      </label>
      <input
        id={`copy-${sourceId}`}
        className="w-72 rounded border border-slate-light px-2 py-1 text-sm"
        value={name}
        onChange={(e) => setName(e.target.value)}
      />
      <button
        type="submit"
        disabled={copy.isPending}
        className="rounded bg-buoy px-3 py-1 text-sm font-medium text-white disabled:opacity-60"
      >
        {copy.isPending ? 'Copying…' : 'Make copy'}
      </button>
      <button type="button" className="text-sm underline" onClick={onDone}>
        Cancel
      </button>
      {copy.isError && (
        <p role="alert" className="basis-full text-sm text-fail">
          {copy.error.message}
        </p>
      )}
    </form>
  );
}

function Profiles({ canEdit }: { canEdit: boolean }) {
  const client = useQueryClient();
  const [copying, setCopying] = useState<string | null>(null);
  const query = useQuery({
    queryKey: ['profiles'],
    queryFn: () => getJson('/api/profiles', profileListSchema),
  });
  const remove = useMutation({
    mutationFn: async (id: string) => {
      const response = await fetch(`/api/profiles/${encodeURIComponent(id)}`, { method: 'DELETE' });
      if (!response.ok) {
        const body = (await response.json().catch(() => null)) as {
          error?: { message?: string };
        } | null;
        throw new ApiRequestError(
          response.status,
          'error',
          body?.error?.message ?? `The server answered ${response.status}.`,
        );
      }
    },
    onSuccess: () => client.invalidateQueries({ queryKey: ['profiles'] }),
  });
  if (query.isPending) return <p className="text-slate">Loading profiles…</p>;
  if (query.isError)
    return (
      <p role="alert" className="text-fail">
        {query.error.message}
      </p>
    );
  const builtIn = query.data.profiles.filter((p) => p.builtIn);
  const own = query.data.profiles.filter((p) => !p.builtIn);
  const row = (entry: (typeof query.data.profiles)[number]) => {
    const count = Object.keys(entry.profile.rules).length;
    return (
      <li key={entry.profile.id} className="px-4 py-3" data-testid="profile-row">
        <div className="flex flex-wrap items-center gap-3">
          <a
            href={`/profiles/${entry.profile.id}`}
            className="font-medium underline-offset-2 hover:underline"
          >
            {entry.profile.name}
          </a>
          <span className="text-xs text-slate">
            {count} rules · version <span className="figures">{entry.profile.version}</span>
          </span>
          {canEdit && (
            <span className="ml-auto flex gap-3 text-sm">
              <button
                type="button"
                className="underline"
                onClick={() => setCopying(entry.profile.id)}
              >
                Copy
              </button>
              {!entry.builtIn && (
                <button
                  type="button"
                  className="text-fail underline"
                  onClick={() =>
                    window.confirm(`Delete “${entry.profile.name}”?`) &&
                    remove.mutate(entry.profile.id)
                  }
                >
                  Delete
                </button>
              )}
            </span>
          )}
        </div>
        {entry.profile.description && (
          <p className="mt-0.5 text-sm text-slate">{entry.profile.description}</p>
        )}
        {copying === entry.profile.id && (
          <CopyForm
            sourceId={entry.profile.id}
            sourceName={entry.profile.name}
            onDone={() => setCopying(null)}
          />
        )}
      </li>
    );
  };
  return (
    <div className="space-y-8">
      {remove.isError && (
        <p role="alert" className="text-sm text-fail">
          {remove.error.message}
        </p>
      )}
      <section aria-labelledby="own-profiles">
        <h2 id="own-profiles" className="text-sm font-semibold uppercase tracking-wide text-slate">
          Your label's profiles
        </h2>
        {own.length === 0 ? (
          <p className="mt-2 rounded border border-dashed border-slate-light p-6 text-center text-slate">
            No profiles of your own yet.
            {canEdit
              ? ' Copy a built-in profile below and adjust it to an outlet’s current specification.'
              : ''}
          </p>
        ) : (
          <ul className="mt-2 divide-y divide-mist rounded-lg border border-mist bg-white">
            {own.map(row)}
          </ul>
        )}
      </section>
      <section aria-labelledby="built-in-profiles">
        <h2
          id="built-in-profiles"
          className="text-sm font-semibold uppercase tracking-wide text-slate"
        >
          Built-in starting points
        </h2>
        <p className="mt-1 text-sm text-slate">
          Drawn from the published standards and common practice. Each outlet's own current
          specification takes precedence: copy a profile to match it.
        </p>
        <ul className="mt-2 divide-y divide-mist rounded-lg border border-mist bg-white">
          {builtIn.map(row)}
        </ul>
      </section>
    </div>
  );
}

export default function ProfileList({ canEdit }: { canEdit: boolean }) {
  return (
    <QueryProvider>
      <Profiles canEdit={canEdit} />
    </QueryProvider>
  );
}
