/** Display helpers shared by islands and pages. Pure. */

/** Seconds as m:ss (or h:mm:ss past an hour); null shows as an en dash. */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds == null || !Number.isFinite(seconds)) return '–';
  const whole = Math.round(seconds);
  const h = Math.floor(whole / 3600);
  const m = Math.floor((whole % 3600) / 60);
  const s = String(whole % 60).padStart(2, '0');
  return h > 0 ? `${h}:${String(m).padStart(2, '0')}:${s}` : `${m}:${s}`;
}

/** CD frames (1/75 s) as seconds with three decimals, e.g. 150 → "2.000 s". */
export function formatFramesAsSeconds(frames: number): string {
  return `${(frames / 75).toFixed(3)} s`;
}

/** Bare ISRC (12 characters) in its written form CC-XXX-YY-NNNNN (ISO 3901). */
export function formatIsrcForDisplay(isrc: string | null): string {
  if (!isrc) return '–';
  if (isrc.length !== 12) return isrc;
  return `${isrc.slice(0, 2)}-${isrc.slice(2, 5)}-${isrc.slice(5, 7)}-${isrc.slice(7)}`;
}

export function formatDate(iso: string | null): string {
  if (!iso) return '–';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().slice(0, 10);
}

/** Bytes as a short figure in decimal units, as file managers show ("1.2 GB", "340 MB"). */
export function formatBytes(bytes: number | null | undefined): string {
  if (bytes == null) return '–';
  if (bytes >= 1e9) return `${(bytes / 1e9).toFixed(2)} GB`;
  if (bytes >= 1e6) return `${(bytes / 1e6).toFixed(1)} MB`;
  if (bytes >= 1e3) return `${(bytes / 1e3).toFixed(0)} kB`;
  return `${bytes} bytes`;
}
