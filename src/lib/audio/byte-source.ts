import { open } from 'node:fs/promises';
import type { Readable } from 'node:stream';
import { AudioAnalysisError } from './errors.ts';

/**
 * Bytes of a file or a stream. Positions only ever move forward for a stream source, which is
 * all the container parser needs: it walks chunks in order and reads the audio once.
 */
export interface ByteSource {
  /** Total length when known (files; streams with a Content-Length), else null. */
  readonly sizeBytes: number | null;
  readonly randomAccess: boolean;
  /** Up to `length` bytes starting at `position`; shorter only at the end of the source. */
  read(position: number, length: number): Promise<Uint8Array>;
  close(): Promise<void>;
}

export async function openFileSource(path: string): Promise<ByteSource> {
  let handle: Awaited<ReturnType<typeof open>>;
  try {
    handle = await open(path, 'r');
  } catch (error) {
    throw new AudioAnalysisError('read-failed', `Could not open ${path}: ${describeError(error)}.`);
  }
  const stats = await handle.stat();
  if (!stats.isFile()) {
    await handle.close();
    throw new AudioAnalysisError('read-failed', `${path} is not a regular file.`);
  }
  return {
    sizeBytes: stats.size,
    randomAccess: true,
    async read(position, length) {
      const size = Math.max(0, Math.min(length, stats.size - position));
      const bytes = new Uint8Array(size);
      let done = 0;
      while (done < size) {
        const { bytesRead } = await handle.read(bytes, done, size - done, position + done);
        if (bytesRead === 0) break;
        done += bytesRead;
      }
      return done === size ? bytes : bytes.subarray(0, done);
    },
    close: () => handle.close(),
  };
}

/** A forward-only source over a Node Readable (an S3 object body, an upload). */
export class StreamByteSource implements ByteSource {
  readonly sizeBytes: number | null;
  readonly randomAccess = false;
  private readonly iterator: AsyncIterator<unknown>;
  private pending: Uint8Array = new Uint8Array(0);
  /** Absolute position of pending[0]. */
  private pendingAt = 0;
  private ended = false;

  constructor(
    private readonly readable: Readable,
    sizeBytes: number | null,
  ) {
    this.sizeBytes = sizeBytes;
    this.iterator = readable[Symbol.asyncIterator]();
  }

  /** Bytes consumed from the stream so far (for progress). */
  get positionBytes(): number {
    return this.pendingAt;
  }

  private async pull(): Promise<boolean> {
    if (this.ended) return false;
    const next = await this.iterator.next();
    if (next.done) {
      this.ended = true;
      return false;
    }
    const value = next.value;
    const chunk =
      typeof value === 'string'
        ? new TextEncoder().encode(value)
        : value instanceof Uint8Array
          ? value
          : new Uint8Array(0);
    if (this.pending.length === 0) {
      this.pending = chunk;
    } else {
      const merged = new Uint8Array(this.pending.length + chunk.length);
      merged.set(this.pending, 0);
      merged.set(chunk, this.pending.length);
      this.pending = merged;
    }
    return true;
  }

  private async skipTo(position: number): Promise<void> {
    if (position < this.pendingAt) {
      throw new AudioAnalysisError(
        'bad-header',
        'The file needs to be read out of order (its format chunk comes after the audio), which is not possible while streaming it.',
      );
    }
    while (position > this.pendingAt + this.pending.length) {
      this.pendingAt += this.pending.length;
      this.pending = new Uint8Array(0);
      if (!(await this.pull())) return;
    }
    const drop = position - this.pendingAt;
    this.pending = this.pending.subarray(drop);
    this.pendingAt = position;
  }

  async read(position: number, length: number): Promise<Uint8Array> {
    await this.skipTo(position);
    if (position > this.pendingAt) return new Uint8Array(0);
    while (this.pending.length < length && (await this.pull())) {
      // keep pulling until enough bytes or the end
    }
    return this.pending.subarray(0, Math.min(length, this.pending.length));
  }

  /**
   * Hands over the next bytes at `position` without copying, at most `maxLength`, at least one
   * byte unless the stream ended; the bytes count as consumed.
   */
  async take(position: number, maxLength: number): Promise<Uint8Array> {
    await this.skipTo(position);
    if (position > this.pendingAt) return new Uint8Array(0);
    if (this.pending.length === 0 && !(await this.pull())) return new Uint8Array(0);
    const chunk = this.pending.subarray(0, Math.min(maxLength, this.pending.length));
    this.pending = this.pending.subarray(chunk.length);
    this.pendingAt += chunk.length;
    return chunk;
  }

  async close(): Promise<void> {
    this.readable.destroy();
  }
}

function describeError(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}
