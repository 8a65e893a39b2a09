import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useId, useState } from 'react';
import { type CsvImportResponse, csvImportResponseSchema } from '@/lib/api/metadata-schemas';
import type { ReleaseDetail } from '@/lib/api/schemas';
import { sendJson } from '../api-client';
import { useHydrated } from '../use-hydrated';
import { buttonClass, ErrorNote, quietButtonClass } from './form-parts';
import { storeRelease } from './track-api';

/** CSV export and import of track metadata, with a preview of every change and row errors. */
export function CsvPanel({ release, locked }: { release: ReleaseDetail; locked: boolean }) {
  const hydrated = useHydrated();
  const client = useQueryClient();
  const inputId = useId();
  const [file, setFile] = useState<{ name: string; text: string } | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const url = `/api/releases/${encodeURIComponent(release.id)}/metadata-import`;
  const preview = useMutation({
    mutationFn: (csv: string) =>
      sendJson('POST', url, { csv, apply: false }, csvImportResponseSchema),
  });
  const apply = useMutation({
    mutationFn: (input: { csv: string; basis: Record<string, number> }) =>
      sendJson('POST', url, { ...input, apply: true }, csvImportResponseSchema),
    onSuccess: (result) => {
      if (result.release) storeRelease(client, result.release);
      setDone(
        `Imported ${result.changeCount} change${result.changeCount === 1 ? '' : 's'} from ${file?.name ?? 'the file'}.`,
      );
      preview.reset();
      setFile(null);
    },
  });
  const result = preview.data;

  return (
    <section
      aria-labelledby={`${inputId}-h`}
      className="mt-6 rounded-lg border border-mist bg-white p-4"
    >
      <h3 id={`${inputId}-h`} className="text-sm font-semibold">
        Track metadata as CSV
      </h3>
      <p className="mt-1 text-sm text-slate">
        Export the tracks, edit titles, artists, ISRCs, ISWCs, credits, disc and side in a
        spreadsheet, and import the file again. You see every change before anything is written, and
        nothing is written while any row has an error.
      </p>
      <div className="mt-3 flex flex-wrap items-center gap-3">
        <a
          href={`/api/releases/${encodeURIComponent(release.id)}/metadata.csv`}
          className={quietButtonClass}
          download
        >
          Export CSV
        </a>
        <label htmlFor={inputId} className="text-sm">
          Import CSV
        </label>
        <input
          id={inputId}
          type="file"
          accept=".csv,text/csv"
          disabled={!hydrated || locked}
          data-testid="csv-file"
          className="text-sm"
          onChange={async (event) => {
            const chosen = event.target.files?.[0];
            event.target.value = '';
            if (!chosen) return;
            const text = await chosen.text();
            setFile({ name: chosen.name, text });
            setDone(null);
            apply.reset();
            preview.mutate(text);
          }}
        />
      </div>
      {locked && (
        <p className="mt-2 text-sm text-slate">Import is off while the release is locked.</p>
      )}
      <p aria-live="polite" className="mt-2 text-sm text-pass" data-testid="csv-done">
        {done ?? ''}
      </p>
      {preview.isPending && <p className="mt-2 text-sm text-slate">Reading {file?.name}…</p>}
      {preview.isError && <ErrorNote error={preview.error} />}
      {apply.isError && (
        <ErrorNote error={apply.error}>
          <p className="mt-1">Nothing was imported.</p>
        </ErrorNote>
      )}
      {result && file && (
        <CsvPreview
          result={result}
          fileName={file.name}
          busy={apply.isPending}
          onApply={() => apply.mutate({ csv: file.text, basis: result.basis })}
          onCancel={() => {
            preview.reset();
            setFile(null);
          }}
        />
      )}
    </section>
  );
}

function CsvPreview({
  result,
  fileName,
  busy,
  onApply,
  onCancel,
}: {
  result: CsvImportResponse;
  fileName: string;
  busy: boolean;
  onApply: () => void;
  onCancel: () => void;
}) {
  const errorRows = result.rows.filter((r) => r.errors.length > 0);
  return (
    <div className="mt-4" data-testid="csv-preview">
      {result.valid ? (
        <p className="text-sm" role="status" data-testid="csv-summary">
          {result.changeCount === 0
            ? `${fileName} matches the release: no changes.`
            : `${fileName}: ${result.changeCount} change${result.changeCount === 1 ? '' : 's'} on ${result.rows.filter((r) => r.changes.length > 0).length} track(s). Nothing is written until you import.`}
        </p>
      ) : (
        <div
          role="alert"
          className="rounded border border-fail/40 bg-fail/5 p-3 text-sm text-fail"
          data-testid="csv-errors"
        >
          <p className="font-medium">
            {fileName} has {result.fileErrors.length + errorRows.length} problem
            {result.fileErrors.length + errorRows.length === 1 ? '' : 's'}; nothing will be written
            until they are fixed.
          </p>
          <ul className="mt-1 list-disc pl-5">
            {result.fileErrors.map((e) => (
              <li key={e}>{e}</li>
            ))}
            {errorRows.flatMap((r) =>
              r.errors.map((e) => (
                <li key={`${r.line}-${e.column}-${e.message}`}>
                  Line {r.line}
                  {r.title ? ` (${r.title})` : ''}
                  {e.column ? `, ${e.column}` : ''}: {e.message}
                </li>
              )),
            )}
          </ul>
        </div>
      )}
      {result.rows.some((r) => r.changes.length > 0) && (
        <table className="mt-3 w-full text-left text-sm">
          <caption className="sr-only">Changes in {fileName}</caption>
          <thead className="text-xs uppercase tracking-wide text-slate">
            <tr>
              <th scope="col" className="py-1 pr-3">
                Line
              </th>
              <th scope="col" className="py-1 pr-3">
                Track
              </th>
              <th scope="col" className="py-1 pr-3">
                Field
              </th>
              <th scope="col" className="py-1 pr-3">
                Now
              </th>
              <th scope="col" className="py-1">
                After import
              </th>
            </tr>
          </thead>
          <tbody>
            {result.rows.flatMap((r) =>
              r.changes.map((c) => (
                <tr key={`${r.line}-${c.field}`} className="border-t border-mist">
                  <td className="figures py-1 pr-3">{r.line}</td>
                  <td className="py-1 pr-3">{r.title}</td>
                  <td className="py-1 pr-3">{c.field}</td>
                  <td className="figures py-1 pr-3 text-slate">{c.before || '–'}</td>
                  <td className="figures py-1">{c.after || '–'}</td>
                </tr>
              )),
            )}
          </tbody>
        </table>
      )}
      <div className="mt-3 flex gap-3">
        <button
          type="button"
          className={buttonClass}
          disabled={!result.valid || result.changeCount === 0 || busy}
          onClick={onApply}
        >
          {busy
            ? 'Importing…'
            : `Import ${result.changeCount} change${result.changeCount === 1 ? '' : 's'}`}
        </button>
        <button type="button" className={quietButtonClass} onClick={onCancel}>
          Discard
        </button>
      </div>
    </div>
  );
}
