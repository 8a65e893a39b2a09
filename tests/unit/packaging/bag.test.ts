import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdtemp, readFile, rm, stat, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BagError, writeBag } from '@/lib/packaging/bag';
import { bagName, masterFileName, toSafeName } from '@/lib/packaging/naming';
import { checkBagRules } from '../../support/bagit';
import { ensureProgram } from '../../support/system-packages';

let dir: string;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'quayside-bag-'));
  ensureProgram('/usr/bin/unzip', ['unzip']);
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('writeBag', () => {
  it('writes a zip that unzip -t accepts and sha256sum -c verifies, byte for byte', async () => {
    const audio = Buffer.alloc(3 * 1024 * 1024 + 17);
    for (let i = 0; i < audio.length; i++) audio[i] = (i * 2654435761) >>> 24;
    const audioPath = join(dir, 'master.wav');
    await writeFile(audioPath, audio);
    const audioSha = createHash('sha256').update(audio).digest('hex');

    const zipPath = join(dir, 'bag.zip');
    const result = await writeBag({
      bagName: 'BWS-014-v1',
      payload: [
        {
          path: 'audio/01 The Low Pylons - Harbour Lights.wav',
          open: () => Readable.from([audio]),
          compress: false,
          expectedSha256: audioSha,
        },
        {
          path: 'metadata/release.json',
          open: () => '{"title":"Night Ferries"}\n',
          compress: true,
        },
        {
          path: 'metadata/tracks.csv',
          open: () => 'position,title\n1,Harbour Lights\n',
          compress: true,
        },
      ],
      info: {
        fields: [
          ['Source-Organization', 'Brackwater Sound'],
          ['External-Identifier', '2001234500012'],
        ],
      },
      output: createWriteStream(zipPath),
      baggingDate: new Date('2027-01-02T10:00:00Z'),
    });
    expect(result.payloadCount).toBe(3);
    expect(result.payloadSha256.get('data/audio/01 The Low Pylons - Harbour Lights.wav')).toBe(
      audioSha,
    );
    expect(result.archiveBytes).toBe((await stat(zipPath)).size);

    // Debian's unzip tests every entry's CRC.
    const tested = execFileSync('unzip', ['-t', zipPath], { encoding: 'utf8' });
    expect(tested).toMatch(/No errors detected/);
    // Audio is stored, not deflated.
    const listing = execFileSync('unzip', ['-v', zipPath], { encoding: 'utf8' });
    expect(listing).toMatch(/Stored\s+\d+\s+0%.*Harbour Lights\.wav/);

    execFileSync('unzip', ['-q', zipPath, '-d', join(dir, 'out')]);
    const bagDir = join(dir, 'out', 'BWS-014-v1');
    // GNU coreutils verifies both manifests independently of our code.
    expect(
      execFileSync('sha256sum', ['-c', 'manifest-sha256.txt'], { cwd: bagDir, encoding: 'utf8' }),
    ).toMatch(/Harbour Lights\.wav: OK/);
    execFileSync('sha256sum', ['-c', '--strict', 'tagmanifest-sha256.txt'], { cwd: bagDir });
    await checkBagRules(bagDir);
    expect(await readFile(join(bagDir, 'bag-info.txt'), 'utf8')).toContain(
      'Bagging-Date: 2027-01-02\n',
    );
  });

  it('fails, rather than packaging, when a file does not match its recorded checksum', async () => {
    const promise = writeBag({
      bagName: 'bad',
      payload: [
        {
          path: 'audio/x.wav',
          open: () => Buffer.from('changed bytes'),
          compress: false,
          expectedSha256: '0'.repeat(64),
        },
      ],
      info: { fields: [] },
      output: createWriteStream(join(dir, 'bad.zip')),
    });
    await expect(promise).rejects.toBeInstanceOf(BagError);
  });

  it('refuses unsafe or duplicate payload paths', async () => {
    for (const path of ['../escape.wav', 'audio/../../x', '/abs.wav', 'a\nb.wav']) {
      await expect(
        writeBag({
          bagName: 'b',
          payload: [{ path, open: () => 'x', compress: true }],
          info: { fields: [] },
          output: createWriteStream(join(dir, 'u.zip')),
        }),
      ).rejects.toThrow(/Unsafe payload path/);
    }
    await expect(
      writeBag({
        bagName: 'b',
        payload: [
          { path: 'a/X.wav', open: () => 'x', compress: true },
          { path: 'a/x.wav', open: () => 'y', compress: true },
        ],
        info: { fields: [] },
        output: createWriteStream(join(dir, 'd.zip')),
      }),
    ).rejects.toThrow(/share the path/);
  });
});

describe('package file names', () => {
  it('puts position first and keeps only safe characters', () => {
    expect(
      masterFileName({
        position: 2,
        disc: 1,
        side: null,
        discCount: 1,
        artist: 'The Low Pylons',
        title: 'Customs House',
        extension: 'WAV',
      }),
    ).toBe('02 The Low Pylons - Customs House.wav');
    expect(
      masterFileName({
        position: 1,
        disc: 1,
        side: 'b',
        discCount: 1,
        artist: 'Mira Ostrander',
        title: 'Lantern Room',
        versionTitle: 'Edit',
        extension: 'wav',
      }),
    ).toBe('B1 Mira Ostrander - Lantern Room (Edit).wav');
    expect(
      masterFileName({
        position: 3,
        disc: 2,
        side: null,
        discCount: 2,
        artist: 'Zoë & Ça',
        title: 'Über/../../etc:passwd',
        extension: 'aiff',
      }),
    ).toBe('2-03 Zoe and Ca - Uber .. .. etc passwd.aiff');
    expect(toSafeName('\u0000\u0007')).toBe('untitled');
    expect(bagName('BWS/014', 'rel-x', 3)).toBe('BWS-014-v3');
  });
});

describe('package documents', () => {
  const release = {
    id: 'rel-1',
    title: 'Night Ferries',
    artist: 'The Low Pylons',
    labelName: 'Brackwater Sound',
    catalogueNumber: 'BWS-014',
    upcEan: '2001234500012',
    releaseDate: '2027-03-05',
    genre: null,
    language: 'en',
    pLine: '℗ 2026 Brackwater Sound',
    cLine: '© 2026 Brackwater Sound',
    explicit: false,
    packageVersion: 1,
    approvedAt: '2027-01-02T10:00:00.000Z',
    approvedBy: 'Nora Quist',
    profiles: [{ id: 'cd-master', name: 'Compact Disc production master', version: 1 }],
    tracks: [
      {
        trackId: 'trk-1',
        position: 1,
        disc: 1,
        side: null,
        title: 'Harbour Lights, "live"',
        versionTitle: null,
        artist: 'The Low Pylons',
        isrc: 'XQBRK2600001',
        iswc: null,
        explicit: false,
        gapBeforeSeconds: 2,
        durationSeconds: 12,
        credits: [{ name: 'Jonah Pell', role: 'composer' }],
        fileName: '01 The Low Pylons - Harbour Lights.wav',
        sha256: 'a'.repeat(64),
        sampleRateHz: 44_100,
        bitsPerSample: 16,
        channels: 2,
      },
    ],
  };

  it('the CSV quotes what needs quoting and parses back to the same values', async () => {
    const { renderTracksCsv } = await import('@/lib/packaging/documents');
    const Papa = (await import('papaparse')).default;
    const csv = renderTracksCsv(release);
    const parsed = Papa.parse<Record<string, string>>(csv.trim(), { header: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data[0]?.title).toBe('Harbour Lights, "live"');
    expect(parsed.data[0]?.credits).toBe('composer: Jonah Pell');
    expect(parsed.data[0]?.gap_before_seconds).toBe('2.000');
  });

  it('the HTML report names each track, escapes text and marks waived findings', async () => {
    const { renderCheckReportHtml } = await import('@/lib/packaging/documents');
    const html = renderCheckReportHtml({
      release,
      checkedAt: '2027-01-02T09:00:00.000Z',
      findings: [
        {
          key: 'k1',
          ruleId: 'truePeak',
          profileId: 'cd-master',
          severity: 'warning',
          trackId: 'trk-1',
          channel: null,
          measured: -0.4,
          limit: -1,
          unit: 'dBTP',
          message: 'True peak <above> the ceiling.',
        },
      ],
      waivers: [
        {
          findingKey: 'k1',
          reason: 'Intended & approved',
          waivedBy: 'Eli Stroud',
          waivedAt: '2027-01-01T00:00:00Z',
        },
      ],
    });
    expect(html).toContain('1. Harbour Lights, &quot;live&quot;');
    expect(html).toContain('True peak &lt;above&gt; the ceiling.');
    expect(html).toContain('▲ Warning (waived)');
    expect(html).toContain('Intended &amp; approved');
    expect(html).toContain('-0.4 dBTP');
  });
});
