/**
 * Builds releases for tests straight into the database: generated masters measured by our
 * audio engine (as an upload would be), recordings, tracks, target profiles and artwork facts.
 */
import { createHash, randomUUID } from 'node:crypto';
import { mkdtemp, readFile, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { inject } from 'vitest';
import { analyzeFileInThread } from '@/lib/audio/analyze-in-thread';
import type { Database } from '@/lib/db/client';
import {
  artworks,
  audioFiles,
  recordings,
  releaseProfiles,
  releases,
  tracks,
} from '@/lib/db/schema';
import { createS3Client, putObject } from '@/lib/storage/s3';
import { type WavSpec, writeWavFile } from './wav-stream';

export interface FixtureTrack {
  title: string;
  /** Tracks with the same recording key share one recording (and so one ISRC). */
  recording?: string;
  isrc: string;
  audio: WavSpec;
  gapBeforeFrames: number;
  side?: string;
}

export interface FixtureRelease {
  id: string;
  title: string;
  profiles: string[];
  upcEan: string;
  /** Artwork facts for the store rules (3000 × 3000 JPEG when true). */
  artwork: boolean;
  /** Store the masters in the S3 fake (needed to build a package); default true. */
  storeAudio?: boolean;
  state?: 'draft' | 'in_review';
  tracks: FixtureTrack[];
}

function fixtureS3() {
  const { endpoint, bucket } = inject('s3');
  const settings = {
    endpoint,
    bucket,
    region: 'us-east-1',
    accessKeyId: 'S3RVER',
    secretAccessKey: 'S3RVER',
  };
  return { client: createS3Client(settings), bucket };
}

export async function createFixtureRelease(db: Database, fixture: FixtureRelease): Promise<void> {
  const dir = await mkdtemp(join(tmpdir(), 'quayside-fixture-'));
  try {
    await db.insert(releases).values({
      id: fixture.id,
      organizationId: 'org-brackwater',
      title: fixture.title,
      artist: 'Fixture Artist',
      labelName: 'Brackwater Sound',
      upcEan: fixture.upcEan,
      catalogueNumber: `FIX-${fixture.id.slice(-6)}`,
      state: fixture.state ?? 'in_review',
    });
    for (const profileId of fixture.profiles) {
      await db.insert(releaseProfiles).values({ releaseId: fixture.id, profileId });
    }
    if (fixture.artwork) {
      await db.insert(artworks).values({
        id: randomUUID(),
        releaseId: fixture.id,
        objectKey: `fixtures/${fixture.id}/cover.jpg`,
        originalName: 'cover.jpg',
        format: 'jpeg',
        widthPx: 3000,
        heightPx: 3000,
        sizeBytes: 1,
        sha256: '0'.repeat(64),
      });
    }
    const recordingIds = new Map<string, string>();
    for (const [index, track] of fixture.tracks.entries()) {
      const key = track.recording ?? `${index}`;
      let recordingId = recordingIds.get(key);
      if (!recordingId) {
        recordingId = `rec-${fixture.id}-${key}`;
        recordingIds.set(key, recordingId);
        const path = join(dir, `${index}.wav`);
        await writeWavFile(path, track.audio);
        const measurements = await analyzeFileInThread(path);
        const objectKey = `fixtures/${recordingId}.wav`;
        let sha256 = '0'.repeat(64);
        if (fixture.storeAudio ?? true) {
          const bytes = await readFile(path);
          sha256 = createHash('sha256').update(bytes).digest('hex');
          await putObject(fixtureS3(), objectKey, bytes, 'audio/wav');
        }
        await db.insert(recordings).values({
          id: recordingId,
          organizationId: 'org-brackwater',
          isrc: track.isrc,
          title: track.title,
          artist: 'Fixture Artist',
          credits: [{ name: 'Fixture Writer', role: 'composer' }],
        });
        await db.insert(audioFiles).values({
          id: `aud-${recordingId}`,
          recordingId,
          fileVersion: 1,
          objectKey,
          originalName: `${track.title}.wav`,
          sizeBytes: (await stat(path)).size,
          sha256,
          sampleRateHz: track.audio.sampleRateHz,
          bitsPerSample: track.audio.bitsPerSample,
          channels: track.audio.channels,
          durationSamples: track.audio.frames,
          measurements,
          analysisState: 'done',
          analyzedAt: new Date(),
        });
        await rm(path);
      }
      await db.insert(tracks).values({
        id: `trk-${fixture.id}-${index + 1}`,
        releaseId: fixture.id,
        recordingId,
        position: index + 1,
        side: track.side ?? null,
        gapBeforeFrames: track.gapBeforeFrames,
      });
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/**
 * A clean stereo tone: two partials a little apart in L and R (so the channels differ),
 * a shared low partial (bass in phase), and 50 ms fades so nothing starts or ends abruptly.
 */
export function cleanTone(options: {
  sampleRateHz: number;
  bitsPerSample: 16 | 24;
  seconds: number;
  peakDbfs: number;
  fadeSeconds?: number;
  contentBits?: number;
}): WavSpec {
  const frames = Math.round(options.seconds * options.sampleRateHz);
  const fade = Math.round((options.fadeSeconds ?? 0.05) * options.sampleRateHz);
  const amplitude = 10 ** (options.peakDbfs / 20) / 3;
  const w = (hz: number) => (2 * Math.PI * hz) / options.sampleRateHz;
  return {
    sampleRateHz: options.sampleRateHz,
    bitsPerSample: options.bitsPerSample,
    channels: 2,
    frames,
    contentBits: options.contentBits,
    sample: (i, ch) => {
      const envelope = fade > 0 ? Math.min(1, i / fade, (frames - 1 - i) / fade) : 1;
      const low = Math.sin(w(110) * i);
      const mid = Math.sin(w(ch === 0 ? 440 : 554.37) * i);
      const high = Math.sin(w(ch === 0 ? 1318.5 : 1661.2) * i + ch);
      return amplitude * envelope * (low + mid + high);
    },
  };
}
