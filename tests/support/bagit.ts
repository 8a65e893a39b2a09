/**
 * Checks of a BagIt bag (RFC 8493) that checksums cannot make: the two lines of bagit.txt,
 * every payload file listed and nothing listed missing, Payload-Oxum, the tag manifest's
 * coverage. Checksums themselves are verified with GNU coreutils (`sha256sum -c`).
 */
import { execFileSync } from 'node:child_process';
import { readdir, readFile, stat, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { GetObjectCommand, type S3Client } from '@aws-sdk/client-s3';
import { expect } from 'vitest';

/** Saves the package object at `key` to `zipPath` and tests it with Info-ZIP's `unzip -t`. */
export async function downloadPackageZip(
  s3: { client: S3Client; bucket: string },
  key: string,
  zipPath: string,
): Promise<string> {
  const answer = await s3.client.send(new GetObjectCommand({ Bucket: s3.bucket, Key: key }));
  const body = answer.Body as { transformToByteArray(): Promise<Uint8Array> };
  await writeFile(zipPath, await body.transformToByteArray());
  expect(execFileSync('unzip', ['-t', zipPath], { encoding: 'utf8' })).toMatch(
    /No errors detected/,
  );
  return zipPath;
}

/**
 * Unpacks the zip into `outDir` and verifies its one bag with independent tools: GNU
 * sha256sum over both manifests (their format is RFC 8493 §2.1.3), then checkBagRules.
 * Returns the bag's folder.
 */
export async function unpackAndVerifyBag(zipPath: string, outDir: string): Promise<string> {
  execFileSync('unzip', ['-q', zipPath, '-d', outDir]);
  const folders = await readdir(outDir);
  expect(folders).toHaveLength(1);
  const bagDir = join(outDir, folders[0] ?? '');
  execFileSync('sha256sum', ['-c', '--strict', 'manifest-sha256.txt'], { cwd: bagDir });
  execFileSync('sha256sum', ['-c', '--strict', 'tagmanifest-sha256.txt'], { cwd: bagDir });
  await checkBagRules(bagDir);
  return bagDir;
}

export /** Reads bagit.txt/bag-info.txt/manifests and checks what checksums cannot (RFC 8493). */
async function checkBagRules(bagDir: string): Promise<void> {
  // RFC 8493 §2.1.1: bagit.txt is exactly the version and encoding lines.
  expect(await readFile(join(bagDir, 'bagit.txt'), 'utf8')).toBe(
    'BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n',
  );
  const manifest = (await readFile(join(bagDir, 'manifest-sha256.txt'), 'utf8')).trim().split('\n');
  const listed = manifest.map((line) => {
    const match = /^([0-9a-f]{64}) {2}(data\/.+)$/.exec(line);
    expect(match, line).not.toBeNull();
    return match?.[2] ?? '';
  });
  // RFC 8493 §3: every payload file is listed, and nothing listed is missing.
  const onDisk = (await readdir(join(bagDir, 'data'), { recursive: true, withFileTypes: true }))
    .filter((e) => e.isFile())
    .map((e) => join(e.parentPath, e.name).slice(bagDir.length + 1));
  expect(onDisk.sort()).toEqual([...listed].sort());
  // RFC 8493 §2.2.2: Payload-Oxum = total octets . file count.
  const info = await readFile(join(bagDir, 'bag-info.txt'), 'utf8');
  const oxum = /^Payload-Oxum: (\d+)\.(\d+)$/m.exec(info);
  let octets = 0;
  for (const path of onDisk) octets += (await stat(join(bagDir, path))).size;
  expect(oxum?.[1]).toBe(String(octets));
  expect(oxum?.[2]).toBe(String(onDisk.length));
  // The tag manifest covers every tag file but itself (RFC 8493 §2.2.1).
  const tagListed = (await readFile(join(bagDir, 'tagmanifest-sha256.txt'), 'utf8'))
    .trim()
    .split('\n')
    .map((l) => l.slice(66));
  expect(tagListed.sort()).toEqual(['bag-info.txt', 'bagit.txt', 'manifest-sha256.txt']);
}
