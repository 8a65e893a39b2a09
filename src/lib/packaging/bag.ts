/**
 * Streams a BagIt bag (RFC 8493, version 1.0) as a zip archive: payload files under data/,
 * then bagit.txt, bag-info.txt, manifest-sha256.txt and tagmanifest-sha256.txt. Payload
 * checksums are computed from the bytes as they pass into the archive, so the manifest
 * states what the package really holds. Nothing is assembled in memory or on disk whole.
 */
import { createHash } from 'node:crypto';
import { PassThrough, type Readable, type Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { ZipArchive } from 'archiver';

export interface PayloadFile {
  /** Path inside data/, with "/" separators and safe characters only. */
  path: string;
  /** Opens the bytes (a file or an object-store stream), or the bytes themselves. */
  open: () => Promise<Readable> | Readable | Buffer | string;
  /** Audio and images are stored as they are; text is deflated. */
  compress: boolean;
  /** If given, the bytes read must hash to this (hex): a mismatch fails the package. */
  expectedSha256?: string;
}

export interface BagInfo {
  /** `bag-info.txt` labels and values, in order (RFC 8493 §2.2.2 reserved labels or our own). */
  fields: [label: string, value: string][];
}

export interface BagResult {
  /** Payload path (relative to the bag, "data/…") → SHA-256 hex. */
  payloadSha256: Map<string, string>;
  payloadOctets: number;
  payloadCount: number;
  /** Bytes written to `output`. */
  archiveBytes: number;
}

export interface BagProgress {
  filesDone: number;
  filesTotal: number;
  bytesWritten: number;
}

export class BagError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BagError';
  }
}

/** RFC 8493 §2.1.3: CR, LF and % in manifest paths are percent-encoded. */
export function encodeManifestPath(path: string): string {
  return path.replaceAll('%', '%25').replaceAll('\r', '%0D').replaceAll('\n', '%0A');
}

/** A bag-info.txt value on one line (continuation lines would need indentation). */
function cleanValue(value: string): string {
  return value.replace(/[\r\n]+/g, ' ').trim();
}

const safePayloadPath = /^[A-Za-z0-9._()\- ]+(\/[A-Za-z0-9._()\- ]+)*$/;

/** A directory inside the zip: the bag's root folder name. */
function rootPrefix(name: string): string {
  if (!/^[A-Za-z0-9._-]+$/.test(name)) throw new BagError(`Unsafe bag folder name: ${name}`);
  return `${name}/`;
}

/**
 * Writes the bag into `output` (e.g. an S3 multipart upload stream) inside a folder
 * `bagName`. Resolves when the zip has been fully written.
 */
export async function writeBag(options: {
  bagName: string;
  payload: PayloadFile[];
  info: BagInfo;
  output: Writable;
  baggingDate?: Date;
  onProgress?: (progress: BagProgress) => void;
  signal?: AbortSignal;
}): Promise<BagResult> {
  const root = rootPrefix(options.bagName);
  const seen = new Set<string>();
  for (const file of options.payload) {
    if (
      !safePayloadPath.test(file.path) ||
      file.path.split('/').some((p) => p === '.' || p === '..')
    ) {
      throw new BagError(`Unsafe payload path: ${file.path}`);
    }
    if (seen.has(file.path.toLowerCase()))
      throw new BagError(`Two payload files share the path ${file.path}`);
    seen.add(file.path.toLowerCase());
  }

  const archive = new ZipArchive({ zlib: { level: 6 } });
  let archiveBytes = 0;
  const counter = new PassThrough();
  counter.on('data', (chunk: Buffer) => {
    archiveBytes += chunk.length;
  });
  const written = pipeline(archive, counter, options.output);
  const abort = () => archive.abort();
  options.signal?.addEventListener('abort', abort, { once: true });

  const payloadSha256 = new Map<string, string>();
  let payloadOctets = 0;
  let filesDone = 0;
  const report = () =>
    options.onProgress?.({
      filesDone,
      filesTotal: options.payload.length + 4,
      bytesWritten: archiveBytes,
    });

  try {
    for (const file of options.payload) {
      options.signal?.throwIfAborted();
      const bagPath = `data/${file.path}`;
      const source = await file.open();
      const hash = createHash('sha256');
      let octets = 0;
      const tap = new PassThrough();
      tap.on('data', (chunk: Buffer) => {
        hash.update(chunk);
        octets += chunk.length;
      });
      const consumed = new Promise<void>((resolve, reject) => {
        tap.once('end', resolve);
        tap.once('error', reject);
      });
      archive.append(tap, { name: root + bagPath, store: !file.compress });
      if (typeof source === 'string' || Buffer.isBuffer(source)) tap.end(source);
      else source.once('error', (e) => tap.destroy(e)).pipe(tap);
      await Promise.race([consumed, written.then(() => consumed)]);
      const digest = hash.digest('hex');
      if (file.expectedSha256 && file.expectedSha256 !== digest) {
        throw new BagError(
          `${file.path} does not match its recorded checksum (expected ${file.expectedSha256}, read ${digest}); the stored file may be damaged.`,
        );
      }
      payloadSha256.set(bagPath, digest);
      payloadOctets += octets;
      filesDone += 1;
      report();
    }

    const tagFiles: [name: string, content: string][] = [];
    // RFC 8493 §2.1.1: exactly these two lines.
    tagFiles.push(['bagit.txt', 'BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n']);
    const date = (options.baggingDate ?? new Date()).toISOString().slice(0, 10);
    const infoLines = [
      ...options.info.fields.map(([label, value]) => `${label}: ${cleanValue(value)}`),
      `Bagging-Date: ${date}`,
      // RFC 8493 §2.2.2: Payload-Oxum is "octetcount.streamcount".
      `Payload-Oxum: ${payloadOctets}.${payloadSha256.size}`,
    ];
    tagFiles.push(['bag-info.txt', `${infoLines.join('\n')}\n`]);
    // Two spaces between checksum and path, so GNU `sha256sum -c` can verify the bag too.
    const manifest = [...payloadSha256]
      .sort(([a], [b]) => a.localeCompare(b))
      .map(([path, sha]) => `${sha}  ${encodeManifestPath(path)}`)
      .join('\n');
    tagFiles.push(['manifest-sha256.txt', `${manifest}\n`]);
    const tagManifest = tagFiles
      .map(([name, content]) => `${createHash('sha256').update(content).digest('hex')}  ${name}`)
      .join('\n');
    tagFiles.push(['tagmanifest-sha256.txt', `${tagManifest}\n`]);
    for (const [name, content] of tagFiles) {
      archive.append(content, { name: root + name });
      filesDone += 1;
    }
    await archive.finalize();
    await written;
    report();
    return { payloadSha256, payloadOctets, payloadCount: payloadSha256.size, archiveBytes };
  } catch (error) {
    archive.abort();
    counter.destroy(error as Error);
    await written.catch(() => undefined);
    throw error;
  } finally {
    options.signal?.removeEventListener('abort', abort);
  }
}
