import type { PanelProps } from '../release/workspace-types';

/** Upload final masters: new tracks, or a new version of a track's file. */
export function UploadPanel(_props: PanelProps) {
  return (
    <p className="rounded border border-dashed border-slate-light p-6 text-center text-slate">
      Uploading masters is coming next.
    </p>
  );
}
