/** The part of archiver 8's API we use (it ships no types). */
declare module 'archiver' {
  import type { Readable, Transform } from 'node:stream';

  interface EntryData {
    name: string;
    /** Store the entry without compression. */
    store?: boolean;
    date?: Date;
  }

  export class ZipArchive extends Transform {
    constructor(options?: { zlib?: { level?: number }; forceZip64?: boolean });
    append(source: Readable | Buffer | string, data: EntryData): this;
    finalize(): Promise<void>;
    abort(): this;
    pointer(): number;
  }
}
