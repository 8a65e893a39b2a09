import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { formatBytes } from '@/lib/api/format';
import {
  type Delivery,
  deliveriesResponseSchema,
  downloadResponseSchema,
} from '@/lib/api/workflow-schemas';
import { ApiRequestError, getJson, sendJson } from '../api-client';
import { QueryProvider } from '../QueryProvider';
import { ReleaseStateBadge } from '../ReleaseStateBadge';

async function post(url: string, body: unknown): Promise<void> {
  const response = await fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(body),
  });
  if (!response.ok) {
    const answer = (await response.json().catch(() => null)) as {
      error?: { message?: string };
    } | null;
    throw new ApiRequestError(
      response.status,
      'error',
      answer?.error?.message ?? `The server answered ${response.status}.`,
    );
  }
}

function DeliveryCard({ delivery }: { delivery: Delivery }) {
  const client = useQueryClient();
  const [returning, setReturning] = useState(false);
  const [reason, setReason] = useState('');
  const refresh = () => client.invalidateQueries({ queryKey: ['deliveries'] });
  const download = useMutation({
    mutationFn: (packageId: string) =>
      sendJson(
        'POST',
        `/api/packages/${encodeURIComponent(packageId)}/download`,
        {},
        downloadResponseSchema,
      ),
    onSuccess: ({ url }) => {
      window.location.assign(url);
      void refresh();
    },
  });
  const answer = useMutation({
    mutationFn: (kind: 'acknowledge' | 'return') =>
      post(
        `/api/releases/${encodeURIComponent(delivery.releaseId)}/${kind}`,
        kind === 'return' ? { reason } : {},
      ),
    onSuccess: () => {
      setReturning(false);
      void refresh();
    },
  });
  const latest = delivery.packages[0];
  return (
    <article
      className="rounded-lg border border-mist bg-white p-4"
      data-testid="delivery"
      data-release={delivery.releaseId}
    >
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h2 className="text-lg font-semibold">{delivery.title}</h2>
          <p className="text-slate">
            {delivery.artist} · {delivery.labelName} ·{' '}
            <span className="figures">{delivery.catalogueNumber ?? '–'}</span> · UPC/EAN{' '}
            <span className="figures">{delivery.upcEan ?? '–'}</span>
          </p>
        </div>
        <ReleaseStateBadge state={delivery.state} />
      </header>
      {delivery.packages.length === 0 ? (
        <p className="mt-3 text-slate">
          The label has shared this release; its package is not ready yet. You will get an e-mail
          when it is.
        </p>
      ) : (
        <ul className="mt-3 space-y-3">
          {delivery.packages.map((p) => (
            <li
              key={p.id}
              className="rounded border border-mist p-3"
              data-testid="delivery-package"
            >
              <div className="flex flex-wrap items-center gap-3">
                <span className="font-medium">Package version {p.version}</span>
                <span className="figures text-sm text-slate">
                  {formatBytes(p.sizeBytes)} · SHA-256 {p.sha256} · downloaded {p.downloads}×
                </span>
                <button
                  type="button"
                  className="ml-auto rounded bg-buoy px-3 py-1.5 text-sm font-medium text-white hover:bg-buoy-dark disabled:opacity-60"
                  onClick={() => download.mutate(p.id)}
                  disabled={download.isPending}
                >
                  Download
                </button>
              </div>
              {p.manifest && (
                <details className="mt-2 text-sm">
                  <summary className="cursor-pointer text-slate">
                    {p.manifest.length} files and their SHA-256
                  </summary>
                  <ul className="figures mt-1 space-y-0.5 text-xs" data-testid="package-files">
                    {p.manifest.map((f) => (
                      <li key={f.path}>
                        <span className="text-slate">{f.sha256}</span> {f.path}
                      </li>
                    ))}
                  </ul>
                </details>
              )}
            </li>
          ))}
        </ul>
      )}
      {download.isError && (
        <p role="alert" className="mt-2 text-sm text-fail">
          {download.error.message}
        </p>
      )}
      {latest && (delivery.state === 'packaged' || delivery.state === 'delivered') && (
        <div className="mt-4 flex flex-wrap items-end gap-2">
          {delivery.state === 'packaged' && (
            <button
              type="button"
              className="rounded border border-slate-light px-3 py-1.5 text-sm hover:bg-sand/60"
              onClick={() => answer.mutate('acknowledge')}
              disabled={answer.isPending}
            >
              Acknowledge delivery
            </button>
          )}
          {!returning ? (
            <button
              type="button"
              className="rounded border border-slate-light px-3 py-1.5 text-sm hover:bg-sand/60"
              onClick={() => setReturning(true)}
            >
              Return…
            </button>
          ) : (
            <form
              className="flex flex-1 flex-wrap items-end gap-2"
              onSubmit={(e) => {
                e.preventDefault();
                answer.mutate('return');
              }}
            >
              <label className="flex-1 text-sm">
                <span className="block">What is wrong? The label sees this.</span>
                <input
                  className="mt-1 w-full rounded border border-slate-light px-2 py-1.5"
                  value={reason}
                  onChange={(e) => setReason(e.target.value)}
                />
              </label>
              <button
                type="submit"
                className="rounded bg-buoy px-3 py-1.5 text-sm font-medium text-white"
              >
                Return to label
              </button>
              <button
                type="button"
                className="text-sm underline"
                onClick={() => setReturning(false)}
              >
                Cancel
              </button>
            </form>
          )}
        </div>
      )}
      {delivery.state === 'delivered' && (
        <p className="mt-2 text-sm text-pass">▲ Acknowledged: the delivery is complete.</p>
      )}
      {answer.isError && (
        <p role="alert" className="mt-2 text-sm text-fail">
          {answer.error.message}
        </p>
      )}
    </article>
  );
}

function Deliveries() {
  const query = useQuery({
    queryKey: ['deliveries'],
    queryFn: () => getJson('/api/deliveries', deliveriesResponseSchema),
  });
  if (query.isPending) return <p className="text-slate">Loading deliveries…</p>;
  if (query.isError)
    return (
      <p role="alert" className="text-fail">
        {query.error.message}
      </p>
    );
  if (query.data.deliveries.length === 0) {
    return (
      <p
        className="rounded border border-dashed border-slate-light p-8 text-center text-slate"
        data-testid="deliveries-empty"
      >
        Nothing has been shared with you yet. When a label shares an approved release, it appears
        here and you get an e-mail.
      </p>
    );
  }
  return (
    <div className="space-y-4">
      {query.data.deliveries.map((d) => (
        <DeliveryCard key={d.releaseId} delivery={d} />
      ))}
    </div>
  );
}

export default function DeliveriesPanel() {
  return (
    <QueryProvider>
      <Deliveries />
    </QueryProvider>
  );
}
