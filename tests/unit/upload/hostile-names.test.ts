/**
 * Hostile file names through every place a name goes: the display name kept for an upload,
 * the Content-Disposition of a download, and the file name inside a package. A fixed corpus
 * of known tricks, then fast-check over arbitrary text (tests/support/fuzz.ts sets counts).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bagName, masterFileName, toSafeName } from '@/lib/packaging/naming';
import { sanitizeDisplayName, titleFromFileName } from '@/lib/server/uploads/files';
import {
  asciiFallbackName,
  attachmentDisposition,
  encodeRfc8187,
} from '@/lib/storage/content-disposition';
import { fuzzTimeout, runFuzz } from '../../support/fuzz';
import { hostileNames } from '../../support/hostile-names';

const bidiOrControl = /[\p{Cc}\p{Cf}\p{Cs}]/u;

describe('display names of uploads', () => {
  it.each(hostileNames.map((n) => [n]))('%j is kept as clean text or refused', (raw) => {
    const name = sanitizeDisplayName(raw);
    if (name === null) return;
    expect(name).not.toMatch(bidiOrControl);
    expect(name).not.toMatch(/[\\/]/);
    expect(name).not.toMatch(/^\.+$/);
    expect(name).toBe(name.trim());
    expect(name).toBe(name.normalize('NFC'));
    expect(Array.from(name).length).toBeLessThanOrEqual(255);
  });

  it('NFC and NFD spellings of a name give one display name', () => {
    expect(sanitizeDisplayName('Cafe\u0301.wav')).toBe(sanitizeDisplayName('Caf\u00e9.wav'));
  });

  it('a lone surrogate is dropped', () => {
    expect(sanitizeDisplayName('\ud800lone-surrogate.wav')).toBe('lone-surrogate.wav');
  });

  it(
    'any text gives clean text or nothing',
    async () => {
      await runFuzz(
        'names: sanitizeDisplayName',
        fc.property(
          fc.oneof(
            fc.string({ unit: 'binary', maxLength: 400 }),
            fc.string({
              unit: fc.constantFrom('.', '/', '\\', '\u0000', '\u202e', ' ', 'a', 'é', '\ud800'),
              maxLength: 40,
            }),
          ),
          (raw) => {
            const name = sanitizeDisplayName(raw);
            if (name === null) return;
            expect(name).not.toMatch(bidiOrControl);
            expect(name).not.toMatch(/[\\/]/);
            expect(name).not.toMatch(/^\.+$/);
            expect(name.length).toBeGreaterThan(0);
            expect(Array.from(name).length).toBeLessThanOrEqual(255);
            expect(titleFromFileName(name).length).toBeGreaterThan(0);
          },
        ),
        2000,
      );
    },
    fuzzTimeout(30_000),
  );
});

/** The two parameters of a disposition, checked as a strict RFC 6266 parser would. */
function readDisposition(header: string): { filename: string; filenameStar: string } {
  expect(header).toMatch(/^[\x20-\x7e]+$/);
  const match =
    /^attachment; filename="([^"\\]*)"; filename\*=UTF-8''((?:[A-Za-z0-9!#$&+\-.^_`|~]|%[0-9A-F]{2})*)$/.exec(
      header,
    );
  expect(match, header).not.toBeNull();
  return { filename: match?.[1] ?? '', filenameStar: decodeURIComponent(match?.[2] ?? '') };
}

describe('Content-Disposition of downloads (RFC 6266, RFC 8187)', () => {
  it.each(hostileNames.filter(Boolean).map((n) => [n]))('%j cannot break out', (raw) => {
    const name = sanitizeDisplayName(raw) ?? 'download.wav';
    const { filename, filenameStar } = readDisposition(attachmentDisposition(name));
    expect(filenameStar).toBe(name);
    expect(filename.length).toBeGreaterThan(0);
  });

  it('writes the ASCII stand-in and the exact UTF-8 name', () => {
    expect(attachmentDisposition('Café "Ørsted" (v2).wav')).toBe(
      `attachment; filename="Cafe __rsted_ (v2).wav"; filename*=UTF-8''Caf%C3%A9%20%22%C3%98rsted%22%20%28v2%29.wav`,
    );
    expect(encodeRfc8187("it's*")).toBe('it%27s%2A');
    expect(asciiFallbackName('🌊 Tide.wav')).toBe('_ Tide.wav');
    expect(asciiFallbackName('🌊🌊')).toBe('download');
    expect(asciiFallbackName('..')).toBe('download');
  });

  it(
    'any text gives a well-formed header that decodes to the same name',
    async () => {
      await runFuzz(
        'names: Content-Disposition',
        fc.property(fc.string({ unit: 'binary', minLength: 1, maxLength: 300 }), (name) => {
          const { filenameStar } = readDisposition(attachmentDisposition(name));
          expect(filenameStar).toBe(name);
        }),
        2000,
      );
    },
    fuzzTimeout(30_000),
  );
});

describe('file names inside a package', () => {
  const entry = (title: string, artist: string, extension: string, side: string | null = null) =>
    masterFileName({
      position: 1,
      disc: 1,
      side,
      discCount: 1,
      artist,
      title,
      versionTitle: null,
      extension,
    });

  it.each(hostileNames.map((n) => [n]))('%j makes a safe zip entry name', (raw) => {
    const display = sanitizeDisplayName(raw) ?? 'x.wav';
    const name = entry(titleFromFileName(display), raw, display.split('.').pop() ?? 'wav');
    expect(name).toMatch(
      /^01 [A-Za-z0-9 ._()-]+ - [A-Za-z0-9 ._()-]+\.(wav|bwf|rf64|aif|aiff|aifc)$/,
    );
  });

  it('keeps only the extensions of the masters we store', () => {
    expect(entry('Tide', 'A', 'AIFF')).toBe('01 A - Tide.aiff');
    expect(entry('Tide', 'A', 'exe')).toBe('01 A - Tide.wav');
    // The "extension" of a name without a dot is the whole name.
    expect(entry('Tide', 'A', 'no extension')).toBe('01 A - Tide.wav');
    expect(entry('Tide', 'A', '')).toBe('01 A - Tide.wav');
  });

  it(
    'any title, artist, side and extension give one safe path segment',
    async () => {
      await runFuzz(
        'names: package entry names',
        fc.property(
          fc.string({ unit: 'binary', maxLength: 200 }),
          fc.string({ unit: 'binary', maxLength: 200 }),
          fc.string({ unit: 'binary', maxLength: 10 }),
          fc.option(fc.string({ unit: 'binary', maxLength: 3 }), { nil: null }),
          fc.string({ maxLength: 70 }),
          (title, artist, extension, side, catalogue) => {
            const name = entry(title, artist, extension, side);
            expect(name).toMatch(/^[A-Za-z0-9 ._()-]+$/);
            expect(name).not.toMatch(/^[.-]/);
            expect(Buffer.byteLength(name)).toBeLessThanOrEqual(200);
            expect(toSafeName(title)).not.toMatch(/^\.+$/);
            expect(bagName(catalogue, 'rel-x', 1)).toMatch(/^[A-Za-z0-9._-]+-v1$/);
            expect(bagName(catalogue, 'rel-x', 1)).not.toMatch(/^[.-]/);
          },
        ),
        2000,
      );
    },
    fuzzTimeout(30_000),
  );
});
