import { type QueryClient, useMutation, useQueryClient } from '@tanstack/react-query';
import type { TrackFields } from '@/lib/api/metadata-schemas';
import { isrcAllocationResponseSchema } from '@/lib/api/metadata-schemas';
import { type ReleaseDetail, releaseDetailSchema } from '@/lib/api/schemas';
import { sendJson } from '../api-client';
import { releaseQueryKey } from '../release/workspace-types';

function releaseUrl(releaseId: string, rest = '') {
  return `/api/releases/${encodeURIComponent(releaseId)}${rest}`;
}

/** Puts a changed release in the cache and refreshes the panels that derive from it. */
export function storeRelease(client: QueryClient, release: ReleaseDetail) {
  client.setQueryData(releaseQueryKey(release.id), release);
  // The workspace's History panel (src/components/release/HistoryPanel.tsx) uses this key.
  void client.invalidateQueries({ queryKey: ['history', release.id] });
}

/** PATCH one track's fields, naming the recording version read. */
export function useTrackPatch(releaseId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: {
      trackId: string;
      recordingVersion: number;
      fields: Partial<Record<keyof TrackFields, unknown>>;
    }) =>
      sendJson(
        'PATCH',
        releaseUrl(releaseId, `/tracks/${encodeURIComponent(input.trackId)}`),
        { ...input.fields, recordingVersion: input.recordingVersion },
        releaseDetailSchema,
      ),
    onSuccess: (release) => storeRelease(client, release),
  });
}

/**
 * PUT the running order and gaps. Optimistic: the table shows the new order at once and
 * goes back to the previous one if the server refuses.
 */
export function useLayoutUpdate(releaseId: string) {
  const client = useQueryClient();
  const key = releaseQueryKey(releaseId);
  return useMutation({
    mutationFn: (input: { version: number; tracks: { id: string; gapBeforeFrames: number }[] }) =>
      sendJson('PUT', releaseUrl(releaseId, '/order'), input, releaseDetailSchema),
    onMutate: async (input) => {
      await client.cancelQueries({ queryKey: key });
      const previous = client.getQueryData<ReleaseDetail>(key);
      if (previous) {
        const byId = new Map(previous.tracks.map((t) => [t.id, t]));
        const tracks = input.tracks.flatMap((t, i) => {
          const track = byId.get(t.id);
          return track ? [{ ...track, position: i + 1, gapBeforeFrames: t.gapBeforeFrames }] : [];
        });
        client.setQueryData<ReleaseDetail>(key, { ...previous, tracks });
      }
      return { previous };
    },
    onError: (_error, _input, context) => {
      if (context?.previous) client.setQueryData(key, context.previous);
    },
    onSuccess: (release) => storeRelease(client, release),
  });
}

/** POST an ISRC allocation for some tracks, or every track without one. */
export function useIsrcAllocation(releaseId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (trackIds?: string[]) =>
      sendJson(
        'POST',
        releaseUrl(releaseId, '/isrc-allocations'),
        trackIds ? { trackIds } : {},
        isrcAllocationResponseSchema,
      ),
    onSuccess: (result) => storeRelease(client, result.release),
  });
}
