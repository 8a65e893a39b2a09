import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useId } from 'react';
import { formatBytes } from '@/lib/api/format';
import { artworkResponseSchema } from '@/lib/api/metadata-schemas';
import { can } from '@/lib/auth/permissions';
import { ApiRequestError, getJson } from '../api-client';
import type { PanelProps } from '../release/workspace-types';
import { useHydrated } from '../use-hydrated';
import { ErrorNote } from './form-parts';
import { isLockedState } from './locking';

async function uploadArtworkFile(releaseId: string, file: File) {
  const response = await fetch(`/api/releases/${encodeURIComponent(releaseId)}/artwork`, {
    method: 'POST',
    headers: {
      'content-type': file.type || 'application/octet-stream',
      'x-file-name': encodeURIComponent(file.name),
      accept: 'application/json',
    },
    body: file,
  });
  const body: unknown = await response.json().catch(() => null);
  if (!response.ok) {
    const message =
      (body as { error?: { message?: string } } | null)?.error?.message ??
      `The server answered ${response.status}.`;
    throw new ApiRequestError(response.status, 'upload_failed', message);
  }
  return artworkResponseSchema.parse(body);
}

/** Cover art: the current image with its facts and, for coordinators, an upload. */
export function ArtworkPanel({ release, role }: PanelProps) {
  const hydrated = useHydrated();
  const inputId = useId();
  const client = useQueryClient();
  const key = ['artwork', release.id] as const;
  const query = useQuery({
    queryKey: key,
    queryFn: () =>
      getJson(`/api/releases/${encodeURIComponent(release.id)}/artwork`, artworkResponseSchema),
  });
  const upload = useMutation({
    mutationFn: (file: File) => uploadArtworkFile(release.id, file),
    onSuccess: (data) => {
      client.setQueryData(key, data);
      void client.invalidateQueries({ queryKey: ['history', release.id] });
    },
  });
  const mayUpload = can(role, 'metadata:edit') && !isLockedState(release.state);
  const art = query.data?.artwork;
  return (
    <div className="mt-4 flex flex-wrap items-start gap-4 border-t border-mist pt-4">
      <div className="flex h-28 w-28 items-center justify-center overflow-hidden rounded border border-mist bg-sand/50 text-center text-xs text-slate">
        {art ? (
          <img
            src={art.url}
            alt={`Cover art of ${release.title}`}
            className="h-full w-full object-cover"
          />
        ) : (
          <span>{query.isPending ? 'Loading…' : 'No cover art yet'}</span>
        )}
      </div>
      <div className="text-sm">
        <p className="text-xs uppercase tracking-wide text-slate">Cover art</p>
        {art ? (
          <p className="figures" data-testid="artwork-facts">
            {art.format.toUpperCase()} · {art.widthPx} × {art.heightPx} px ·{' '}
            {formatBytes(art.sizeBytes)} · {art.originalName}
          </p>
        ) : (
          <p className="text-slate">
            {mayUpload ? 'Upload the front cover.' : 'The coordinator uploads the front cover.'}
          </p>
        )}
        {mayUpload && (
          <div className="mt-2">
            <label htmlFor={inputId} className="mr-2">
              {art ? 'Replace cover art' : 'Upload cover art'}
            </label>
            <input
              id={inputId}
              type="file"
              accept="image/jpeg,image/png"
              disabled={!hydrated || upload.isPending}
              data-testid="artwork-file"
              onChange={(e) => {
                const file = e.target.files?.[0];
                e.target.value = '';
                if (file) upload.mutate(file);
              }}
            />
            <p className="mt-1 text-xs text-slate">
              JPEG or PNG, square, at least 3000 × 3000 px, RGB colour (what most distributors ask
              for).
            </p>
            <p aria-live="polite" className="text-xs text-slate">
              {upload.isPending
                ? 'Uploading and checking…'
                : upload.isSuccess
                  ? 'Cover art saved.'
                  : ''}
            </p>
          </div>
        )}
        {upload.isError && (
          <div className="mt-2">
            <ErrorNote error={upload.error}>
              <p className="mt-1">The previous cover art, if any, is kept.</p>
            </ErrorNote>
          </div>
        )}
      </div>
    </div>
  );
}
