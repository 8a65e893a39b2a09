/**
 * The documents inside a package besides the audio: release and track metadata as JSON and
 * CSV, and the check report (HTML for people, JSON for machines). Pure functions of their
 * inputs, so a package can be rebuilt byte for byte from the same data.
 */
import Papa from 'papaparse';
import type { Finding } from '../specs/types';

export interface PackageTrack {
  trackId: string;
  position: number;
  disc: number;
  side: string | null;
  title: string;
  versionTitle: string | null;
  artist: string;
  isrc: string | null;
  iswc: string | null;
  explicit: boolean;
  gapBeforeSeconds: number;
  durationSeconds: number | null;
  credits: { name: string; role: string }[];
  /** File name inside data/audio/ and its SHA-256. */
  fileName: string;
  sha256: string;
  sampleRateHz: number | null;
  bitsPerSample: number | null;
  channels: number | null;
}

export interface PackageRelease {
  id: string;
  title: string;
  artist: string;
  labelName: string;
  catalogueNumber: string | null;
  upcEan: string | null;
  releaseDate: string | null;
  genre: string | null;
  language: string | null;
  pLine: string | null;
  cLine: string | null;
  explicit: boolean;
  packageVersion: number;
  approvedAt: string;
  approvedBy: string;
  profiles: { id: string; name: string; version: number }[];
  tracks: PackageTrack[];
}

export interface PackageWaiver {
  findingKey: string;
  reason: string;
  waivedBy: string;
  waivedAt: string;
}

/** Release and track metadata as JSON (stable key order, two-space indent). */
export function renderReleaseJson(release: PackageRelease): string {
  return `${JSON.stringify({ format: 'quayside-release/1', ...release }, null, 2)}\n`;
}

/** One row per track; credits joined as "role: name; role: name". */
export function renderTracksCsv(release: PackageRelease): string {
  const rows = release.tracks.map((t) => ({
    disc: t.disc,
    side: t.side ?? '',
    position: t.position,
    title: t.title,
    version: t.versionTitle ?? '',
    artist: t.artist,
    isrc: t.isrc ?? '',
    iswc: t.iswc ?? '',
    explicit: t.explicit ? 'yes' : 'no',
    gap_before_seconds: t.gapBeforeSeconds.toFixed(3),
    duration_seconds: t.durationSeconds === null ? '' : t.durationSeconds.toFixed(3),
    credits: t.credits.map((c) => `${c.role}: ${c.name}`).join('; '),
    file: t.fileName,
    sha256: t.sha256,
  }));
  return `${Papa.unparse(rows, { newline: '\n' })}\n`;
}

export function renderCheckReportJson(input: {
  release: PackageRelease;
  findings: readonly Finding[];
  waivers: readonly PackageWaiver[];
  checkedAt: string;
}): string {
  return `${JSON.stringify(
    {
      format: 'quayside-check-report/1',
      release: {
        id: input.release.id,
        title: input.release.title,
        packageVersion: input.release.packageVersion,
      },
      checkedAt: input.checkedAt,
      profiles: input.release.profiles,
      findings: input.findings,
      waivers: input.waivers,
    },
    null,
    2,
  )}\n`;
}

function escapeHtml(value: string): string {
  return value
    .replaceAll('&', '&amp;')
    .replaceAll('<', '&lt;')
    .replaceAll('>', '&gt;')
    .replaceAll('"', '&quot;');
}

const severityMark = { pass: '● Pass', warning: '▲ Warning', failure: '■ Failure' } as const;

function formatMeasured(value: number | string | null, unit: string): string {
  if (value === null) return '–';
  const text = typeof value === 'number' ? String(Number(value.toFixed(3))) : value;
  return unit ? `${text} ${unit}` : text;
}

/** A self-contained HTML page: one table per profile, every finding with value and limit. */
export function renderCheckReportHtml(input: {
  release: PackageRelease;
  findings: readonly Finding[];
  waivers: readonly PackageWaiver[];
  checkedAt: string;
}): string {
  const { release } = input;
  const titles = new Map(release.tracks.map((t) => [t.trackId, `${t.position}. ${t.title}`]));
  const waived = new Map(input.waivers.map((w) => [w.findingKey, w]));
  const sections = release.profiles.map((profile) => {
    const rows = input.findings
      .filter((f) => f.profileId === profile.id)
      .map((f) => {
        const waiver = waived.get(f.key);
        const track = f.trackId ? (titles.get(f.trackId) ?? f.trackId) : 'Whole release';
        return `<tr class="${f.severity}"><td>${severityMark[f.severity]}${waiver ? ' (waived)' : ''}</td><td>${escapeHtml(track)}</td><td>${escapeHtml(f.message)}${
          waiver
            ? `<br><em>Waived by ${escapeHtml(waiver.waivedBy)} on ${escapeHtml(waiver.waivedAt.slice(0, 10))}: ${escapeHtml(waiver.reason)}</em>`
            : ''
        }</td><td>${escapeHtml(formatMeasured(f.measured, f.unit))}</td><td>${escapeHtml(formatMeasured(f.limit, f.unit))}</td></tr>`;
      });
    return `<h2>${escapeHtml(profile.name)} <small>(version ${profile.version})</small></h2>
<table><thead><tr><th>Verdict</th><th>Track</th><th>Finding</th><th>Measured</th><th>Limit</th></tr></thead>
<tbody>${rows.join('\n')}</tbody></table>`;
  });
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Check report: ${escapeHtml(release.title)}</title>
<style>body{font-family:sans-serif;margin:2rem;color:#15202b}table{border-collapse:collapse;width:100%;margin-bottom:2rem}
td,th{border:1px solid #dfe5ea;padding:.3rem .5rem;text-align:left;vertical-align:top;font-size:.9rem}
.failure td:first-child{color:#a32121}.warning td:first-child{color:#8a5a00}.pass td:first-child{color:#1f6b4a}</style></head>
<body><h1>Check report: ${escapeHtml(release.title)} — ${escapeHtml(release.artist)}</h1>
<p>${escapeHtml(release.labelName)} · ${escapeHtml(release.catalogueNumber ?? '')} · UPC/EAN ${escapeHtml(release.upcEan ?? '–')} · package version ${release.packageVersion}<br>
Checked ${escapeHtml(input.checkedAt)} · approved ${escapeHtml(release.approvedAt)} by ${escapeHtml(release.approvedBy)}</p>
${sections.join('\n')}
</body></html>
`;
}
