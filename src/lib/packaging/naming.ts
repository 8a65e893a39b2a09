/**
 * File names inside a package: one clear convention, safe on every file system and in every
 * zip tool. Position first so a plain directory listing plays in order.
 */

/** Letters with accents lose them, anything outside [A-Za-z0-9 ._()-] becomes a space. */
export function toSafeName(text: string, maxLength = 80): string {
  const ascii = text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replaceAll('&', 'and')
    .replace(/[^A-Za-z0-9 ._()-]+/g, ' ')
    .replace(/\s+/g, ' ')
    .replace(/^[ .-]+|[ .]+$/g, '');
  const cut = ascii.slice(0, maxLength).trim();
  return cut.length > 0 ? cut : 'untitled';
}

/**
 * Extensions a master keeps in a package. Anything else (an uploader's "x.exe", a name with
 * no dot at all, whose last "extension" is the whole name) becomes .wav: we store only WAV
 * and AIFF masters, checked by their content.
 */
const MASTER_EXTENSIONS = new Set(['wav', 'bwf', 'rf64', 'aif', 'aiff', 'aifc']);

/**
 * "A1 Artist - Title.wav" for vinyl sides, "01 Artist - Title.wav" for a single disc,
 * "2-03 Artist - Title.wav" from the second disc on a multi-disc release.
 */
export function masterFileName(track: {
  position: number;
  disc: number;
  side: string | null;
  discCount: number;
  artist: string;
  title: string;
  versionTitle?: string | null;
  extension: string;
}): string {
  const number = String(track.position).padStart(2, '0');
  const prefix = track.side
    ? `${toSafeName(track.side, 2).toUpperCase()}${track.position}`
    : track.discCount > 1
      ? `${track.disc}-${number}`
      : number;
  const title = track.versionTitle ? `${track.title} (${track.versionTitle})` : track.title;
  const asked = track.extension.replace(/[^a-z0-9]/gi, '').toLowerCase();
  const extension = MASTER_EXTENSIONS.has(asked) ? asked : 'wav';
  return `${prefix} ${toSafeName(track.artist, 60)} - ${toSafeName(title, 100)}.${extension}`;
}

/** The bag's folder name: catalogue number (or release id) and package version. */
export function bagName(
  catalogueNumber: string | null,
  releaseId: string,
  version: number,
): string {
  // No leading dot or dash: the folder would be hidden, or read as an option by a shell tool.
  const base = (catalogueNumber ?? releaseId)
    .replace(/[^A-Za-z0-9._-]+/g, '-')
    .replace(/^[-.]+|-+$/g, '');
  return `${base || 'release'}-v${version}`;
}

/** The name a downloaded package is saved under. */
export function packageFileName(
  catalogueNumber: string | null,
  releaseId: string,
  version: number,
): string {
  return `${bagName(catalogueNumber, releaseId, version)}.zip`;
}
