/** Browser side of an upload: a quick look at the file, then one streamed XHR with progress. */
import { type UploadResult, uploadResultSchema } from '@/lib/api/schemas';

export { formatBytes } from '@/lib/api/format';

/** The title a new track would get (the server decides; this mirrors it for the list). */
export function guessTitle(fileName: string): string {
  const base = fileName.replace(/\.(wav|wave|bwf|rf64|aif|aiff|aifc)$/i, '');
  return (
    base
      .replace(/_/g, ' ')
      .replace(/^\s*\d{1,3}\s*[-.–_)]?\s+/, '')
      .replace(/\s+/g, ' ')
      .trim() || base
  );
}

/**
 * Looks at the first 12 bytes so an obviously wrong file is refused before it is sent.
 * The server checks again; this only saves a long wait. Null when it looks like a master.
 */
export async function sniffFile(file: File): Promise<string | null> {
  if (file.size === 0) return 'The file is empty.';
  const head = new Uint8Array(await file.slice(0, 12).arrayBuffer());
  const text = (from: number, to: number) => String.fromCharCode(...head.subarray(from, to));
  const riff = text(0, 4);
  const form = text(8, 12);
  if ((riff === 'RIFF' || riff === 'RF64' || riff === 'BW64') && form === 'WAVE') return null;
  if (riff === 'FORM' && (form === 'AIFF' || form === 'AIFC')) return null;
  return 'This is not a WAV, BWF, RF64 or AIFF file (its first bytes say otherwise).';
}

export type UploadOutcome =
  | { ok: true; result: UploadResult }
  | { ok: false; cancelled: boolean; message: string };

export interface UploadHandle {
  uploadId: string;
  cancel(): void;
  done: Promise<UploadOutcome>;
}

/**
 * Sends `file` as the raw body of one request. XHR, because fetch reports no upload
 * progress; the browser streams the file from disk, so memory does not grow with its size.
 */
export function startUpload(options: {
  releaseId: string;
  file: File;
  trackId: string | null;
  onProgress: (bytesSent: number) => void;
}): UploadHandle {
  const uploadId = crypto.randomUUID();
  const query = new URLSearchParams({ uploadId, name: options.file.name });
  if (options.trackId) query.set('trackId', options.trackId);
  const xhr = new XMLHttpRequest();
  let cancelled = false;
  const done = new Promise<UploadOutcome>((resolve) => {
    xhr.upload.onprogress = (event) => options.onProgress(event.loaded);
    xhr.onload = () => {
      let body: unknown = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = null;
      }
      if (xhr.status === 201) {
        const parsed = uploadResultSchema.safeParse(body);
        if (parsed.success) return resolve({ ok: true, result: parsed.data });
      }
      const message =
        (body as { error?: { message?: string } } | null)?.error?.message ??
        `The server answered ${xhr.status}.`;
      resolve({ ok: false, cancelled, message });
    };
    xhr.onerror = () =>
      resolve({
        ok: false,
        cancelled,
        message: 'The connection was lost. Nothing was replaced; try again.',
      });
    xhr.onabort = () =>
      resolve({
        ok: false,
        cancelled: true,
        message: 'Nothing was stored; the previous file stays current.',
      });
  });
  xhr.open('POST', `/api/releases/${encodeURIComponent(options.releaseId)}/uploads?${query}`);
  xhr.setRequestHeader('content-type', options.file.type || 'application/octet-stream');
  xhr.setRequestHeader('accept', 'application/json');
  xhr.send(options.file);
  return {
    uploadId,
    cancel() {
      cancelled = true;
      xhr.abort();
      // Tell the server too, so it stops at once rather than when it notices the socket.
      void fetch(`/api/uploads/${uploadId}`, { method: 'DELETE' }).catch(() => undefined);
    },
    done,
  };
}
