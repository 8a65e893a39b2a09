/**
 * Pure rules for an uploaded master: what its first bytes must look like, how its name is
 * kept for display, and how big it may be. No I/O, so the browser-free unit tests and the
 * route share one definition.
 */

export { formatBytes } from '../../api/format';

/** The containers we store, from their magic numbers (RIFF/RF64/BW64 WAVE, FORM AIFF/AIFC). */
export type MasterContainer = 'wav' | 'rf64' | 'bw64' | 'aiff' | 'aifc';

/** How many leading bytes `sniffMasterHeader` needs. */
export const SNIFF_BYTES = 12;

export type SniffResult =
  | { ok: true; container: MasterContainer; extension: 'wav' | 'aif'; contentType: string }
  | { ok: false; message: string };

const ascii = (bytes: Uint8Array, from: number, to: number) =>
  String.fromCharCode(...bytes.subarray(from, to));

/** Other formats an engineer might drop by mistake, so the refusal can name them. */
function nameOtherFormat(bytes: Uint8Array): string | null {
  const head4 = ascii(bytes, 0, 4);
  if (head4 === 'fLaC') return 'a FLAC file';
  if (head4 === 'OggS') return 'an Ogg file';
  if (ascii(bytes, 0, 3) === 'ID3' || (bytes[0] === 0xff && ((bytes[1] ?? 0) & 0xe0) === 0xe0))
    return 'an MP3 file';
  if (ascii(bytes, 4, 8) === 'ftyp') return 'an MP4/M4A file';
  if (head4 === '%PDF') return 'a PDF document';
  if (bytes[0] === 0x50 && bytes[1] === 0x4b) return 'a zip archive';
  if (bytes[0] === 0xff && bytes[1] === 0xd8) return 'a JPEG image';
  if (head4 === '\x89PNG') return 'a PNG image';
  // Mostly printable ASCII/UTF-8 with no NUL: text (a renamed .txt, .csv, .json…).
  if (bytes.length > 0 && bytes.every((b) => b === 9 || b === 10 || b === 13 || b >= 32))
    return 'a text file';
  return null;
}

/**
 * Decides from the first bytes whether a body is a master we accept: WAV/BWF (RIFF…WAVE),
 * RF64 or BW64 (EBU Tech 3306), AIFF or AIFF-C. The name's extension is never trusted.
 */
export function sniffMasterHeader(bytes: Uint8Array): SniffResult {
  if (bytes.length === 0) return { ok: false, message: 'The file is empty (0 bytes).' };
  if (bytes.length >= SNIFF_BYTES) {
    const riff = ascii(bytes, 0, 4);
    const form = ascii(bytes, 8, 12);
    if (riff === 'RIFF' && form === 'WAVE')
      return { ok: true, container: 'wav', extension: 'wav', contentType: 'audio/wav' };
    if (riff === 'RF64' && form === 'WAVE')
      return { ok: true, container: 'rf64', extension: 'wav', contentType: 'audio/wav' };
    if (riff === 'BW64' && form === 'WAVE')
      return { ok: true, container: 'bw64', extension: 'wav', contentType: 'audio/wav' };
    if (riff === 'FORM' && form === 'AIFF')
      return { ok: true, container: 'aiff', extension: 'aif', contentType: 'audio/aiff' };
    if (riff === 'FORM' && form === 'AIFC')
      return { ok: true, container: 'aifc', extension: 'aif', contentType: 'audio/aiff' };
  }
  const other = nameOtherFormat(bytes);
  return {
    ok: false,
    message: `This is ${other ?? 'not a WAV or AIFF file'}${other ? ', not a WAV or AIFF master' : ''}. Upload an uncompressed WAV, BWF, RF64 or AIFF file; nothing was stored.`,
  };
}

/** Longest display name kept, in characters (common practice for file names: 255). */
export const MAX_NAME_CHARS = 255;

/**
 * The original file name reduced to safe display text: only the last path segment, no
 * control, bidirectional-override or zero-width characters, whitespace collapsed, at most
 * 255 characters. Returns null when nothing usable is left. Object keys never use it.
 */
export function sanitizeDisplayName(raw: string): string | null {
  const lastSegment = raw.split(/[\\/]/).pop() ?? '';
  const cleaned = lastSegment
    .normalize('NFC')
    .replace(/\s+/g, ' ')
    // C0/C1 controls, DEL, Unicode format characters (bidi overrides, zero-width) and lone
    // surrogates (not text; a download header could not encode them).
    .replace(/[\p{Cc}\p{Cf}\p{Cs}]/gu, '')
    .replace(/ {2,}/g, ' ')
    .trim()
    // A name made only of dots ("..", "...") is a path trick, not a name.
    .replace(/^\.+$/, '');
  if (!cleaned) return null;
  return Array.from(cleaned).slice(0, MAX_NAME_CHARS).join('');
}

/**
 * A track title guessed from a file name: extension dropped, a leading track number
 * ("01 ", "02 - ", "3. ") and underscores turned into spaces.
 */
export function titleFromFileName(displayName: string): string {
  const withoutExtension = displayName.replace(/\.(wav|wave|bwf|rf64|aif|aiff|aifc)$/i, '');
  const title = withoutExtension
    .replace(/_/g, ' ')
    .replace(/^\s*\d{1,3}\s*[-.–_)]?\s+/, '')
    .replace(/\s+/g, ' ')
    .trim();
  return (title || withoutExtension.trim() || 'Untitled').slice(0, 200);
}
