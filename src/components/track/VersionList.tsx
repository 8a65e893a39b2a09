import { formatDate } from '@/lib/api/format';
import type { AudioFileVersion } from '@/lib/api/schemas';
import { AnalysisStateText } from '../upload/AnalysisStateText';
import { formatBytes } from '../upload/upload-client';

/** Every stored version of the track's master, newest (current) first. */
export function VersionList({
  versions,
  canDownload,
}: {
  versions: AudioFileVersion[];
  canDownload: boolean;
}) {
  if (versions.length === 0) {
    return <p className="text-slate">No files yet.</p>;
  }
  return (
    <div className="overflow-x-auto rounded border border-mist bg-white">
      <table className="w-full text-left text-sm" data-testid="version-list">
        <thead className="border-b border-mist text-slate">
          <tr>
            <th className="px-3 py-2 font-medium">Version</th>
            <th className="px-3 py-2 font-medium">File</th>
            <th className="px-3 py-2 font-medium">Size</th>
            <th className="px-3 py-2 font-medium">SHA-256</th>
            <th className="px-3 py-2 font-medium">Uploaded</th>
            <th className="px-3 py-2 font-medium">Analysis</th>
            {canDownload && (
              <th className="px-3 py-2 font-medium">
                <span className="sr-only">Download</span>
              </th>
            )}
          </tr>
        </thead>
        <tbody>
          {versions.map((v, index) => (
            <tr key={v.id} className="border-b border-mist last:border-0">
              <td className="figures px-3 py-2">
                v{v.fileVersion}
                {index === 0 && <span className="ml-2 font-sans text-pass">● current</span>}
              </td>
              <td className="break-all px-3 py-2">{v.originalName}</td>
              <td className="figures px-3 py-2">{formatBytes(v.sizeBytes)}</td>
              <td className="figures px-3 py-2" title={v.sha256}>
                {v.sha256.slice(0, 12)}…
              </td>
              <td className="px-3 py-2">
                {formatDate(v.uploadedAt)}
                {v.uploadedBy && ` · ${v.uploadedBy}`}
              </td>
              <td className="px-3 py-2">
                <AnalysisStateText file={v} />
              </td>
              {canDownload && (
                <td className="px-3 py-2">
                  <a className="underline" href={`/api/audio/${encodeURIComponent(v.id)}/download`}>
                    Download<span className="sr-only"> version {v.fileVersion}</span>
                  </a>
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
