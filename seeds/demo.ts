/**
 * The demo scenario: an invented independent label, Brackwater Sound, with one member per
 * role, an outside distributor account and three releases in different states. Every name,
 * title and code here is invented. Barcodes use the GS1 restricted-circulation range
 * (prefix 20), which never identifies a real retail product; ISRCs use the invented
 * registrant prefix XQ-BRK.
 */
import { createHash } from 'node:crypto';
import { Readable } from 'node:stream';
import type { S3Client } from '@aws-sdk/client-s3';
import { eq } from 'drizzle-orm';
import { analyzeStreamInThread } from '../src/lib/audio/analyze-in-thread';
import type { Auth } from '../src/lib/auth/auth';
import type { Role } from '../src/lib/auth/permissions';
import type { Database } from '../src/lib/db/client';
import {
  artworks,
  audioFiles,
  auditEvents,
  isrcAllocations,
  isrcRegistrants,
  member,
  organization,
  packages,
  recordings,
  releaseProfiles,
  releaseShares,
  releases,
  tracks,
  user,
} from '../src/lib/db/schema';
import { runChecks } from '../src/lib/server/checks';
import { uploadArtwork } from '../src/lib/server/metadata/artwork';
import { waitForPackageBuilds } from '../src/lib/server/packaging';
import type { Actor } from '../src/lib/server/route';
import { approveRelease, signOff } from '../src/lib/server/workflow';
import { objectExists, putObject } from '../src/lib/storage/s3';
import { coverArtPng } from './cover-art';
import { type SynthSpec, synthesizeWav } from './synth';

export const demoPassword = 'quayside-demo';

export const demoUsers: { name: string; email: string; role: Role }[] = [
  { name: 'Ada Marlow', email: 'admin@brackwater.test', role: 'admin' },
  { name: 'Eli Stroud', email: 'engineer@brackwater.test', role: 'engineer' },
  { name: 'Nora Quist', email: 'coordinator@brackwater.test', role: 'coordinator' },
  { name: 'Dev Okafor', email: 'distributor@northpier.test', role: 'distributor' },
];

const label = { id: 'org-brackwater', name: 'Brackwater Sound', slug: 'brackwater-sound' };

interface DemoTrack {
  title: string;
  isrc: string | null;
  composer: string;
  gapBeforeFrames: number;
  audio: Omit<SynthSpec, 'seed'>;
}

interface DemoRelease {
  id: string;
  title: string;
  artist: string;
  catalogueNumber: string;
  upcEan: string | null;
  releaseDate: string;
  genre: string;
  state: 'draft' | 'in_review';
  profiles: string[];
  sharedWithDistributor: boolean;
  tracks: DemoTrack[];
}

const cd = { sampleRateHz: 44_100, bitDepth: 16 as const };
const hires = { sampleRateHz: 48_000, bitDepth: 24 as const };

export const demoReleases: DemoRelease[] = [
  {
    id: 'rel-night-ferries',
    title: 'Night Ferries',
    artist: 'The Low Pylons',
    catalogueNumber: 'BWS-014',
    upcEan: '2001234500012',
    releaseDate: '2027-03-05',
    genre: 'Indie Rock',
    state: 'in_review',
    profiles: ['streaming-standard', 'cd-master'],
    sharedWithDistributor: false,
    tracks: [
      {
        title: 'Harbour Lights',
        isrc: 'XQBRK2600001',
        composer: 'Jonah Pell',
        gapBeforeFrames: 150,
        audio: { ...cd, seconds: 12, chordHz: [220, 277.18, 329.63], peakDbfs: -1.2 },
      },
      {
        title: 'Customs House',
        isrc: 'XQBRK2600002',
        composer: 'Jonah Pell',
        gapBeforeFrames: 150,
        // Left at 48 kHz on purpose: the disc profile should catch it.
        audio: {
          sampleRateHz: 48_000,
          bitDepth: 16,
          seconds: 10,
          chordHz: [196, 246.94, 293.66],
          peakDbfs: -1,
        },
      },
      {
        title: 'The Long Swell',
        isrc: 'XQBRK2600003',
        composer: 'Ines Harrow',
        gapBeforeFrames: 0,
        audio: { ...cd, seconds: 14, chordHz: [174.61, 220, 261.63], peakDbfs: -0.5 },
      },
      {
        title: 'Tender to Shore',
        isrc: 'XQBRK2600004',
        composer: 'Jonah Pell',
        gapBeforeFrames: 150,
        audio: { ...cd, seconds: 11, chordHz: [146.83, 185, 220], peakDbfs: -2, fadeSeconds: 3 },
      },
    ],
  },
  {
    id: 'rel-tideline',
    title: 'Tideline',
    artist: 'Mira Ostrander',
    catalogueNumber: 'BWS-015',
    upcEan: null,
    releaseDate: '2027-05-14',
    genre: 'Electronic',
    state: 'draft',
    profiles: ['streaming-hires', 'vinyl-12-45'],
    sharedWithDistributor: false,
    tracks: [
      {
        title: 'Salt in the Rigging',
        isrc: 'XQBRK2600005',
        composer: 'Mira Ostrander',
        gapBeforeFrames: 0,
        audio: { ...hires, seconds: 12, chordHz: [110, 164.81, 220], peakDbfs: -1.5 },
      },
      {
        title: 'Lantern Room',
        isrc: null,
        composer: 'Mira Ostrander',
        gapBeforeFrames: 150,
        audio: { ...hires, seconds: 9, chordHz: [130.81, 196, 261.63], peakDbfs: -3 },
      },
      {
        title: 'Breakwater (Reprise)',
        isrc: null,
        composer: 'Mira Ostrander',
        gapBeforeFrames: 150,
        audio: { ...hires, seconds: 8, chordHz: [98, 146.83, 196], peakDbfs: -6, fadeSeconds: 2 },
      },
    ],
  },
  {
    id: 'rel-signal-hill',
    title: 'Signal Hill',
    artist: 'Cassia Velde',
    catalogueNumber: 'BWS-012',
    upcEan: '2001234500029',
    releaseDate: '2027-01-22',
    genre: 'Folk',
    // Approved and packaged by the seed through the product's own workflow (see below).
    state: 'in_review',
    profiles: ['streaming-standard'],
    sharedWithDistributor: true,
    tracks: [
      {
        title: 'Signal Hill',
        isrc: 'XQBRK2500017',
        composer: 'Cassia Velde',
        gapBeforeFrames: 150,
        audio: { ...cd, seconds: 10, chordHz: [196, 293.66, 392], peakDbfs: -1.1 },
      },
      {
        title: 'Quiet Fog Warning',
        isrc: 'XQBRK2500018',
        composer: 'Cassia Velde',
        gapBeforeFrames: 150,
        audio: { ...cd, seconds: 9, chordHz: [164.81, 246.94, 329.63], peakDbfs: -1.4 },
      },
    ],
  },
];

export interface SeedResult {
  created: boolean;
  users: typeof demoUsers;
  uploaded: number;
}

/**
 * Creates the demo scenario unless it is already there, and (re)uploads any demo audio the
 * object store is missing. Safe to run on every start.
 */
export async function seedDemo(deps: {
  db: Database;
  auth: Auth;
  s3: { client: S3Client; bucket: string };
}): Promise<SeedResult> {
  const { db, auth, s3 } = deps;
  const [existing] = await db
    .select()
    .from(organization)
    .where(eq(organization.id, label.id))
    .limit(1);
  let created = false;
  if (!existing) {
    await createScenario(db, auth);
    created = true;
  }
  const uploaded = await uploadMissingAudio(db, s3);
  await packageApprovedDemoRelease(db);
  return { created, users: demoUsers, uploaded };
}

async function createScenario(db: Database, auth: Auth): Promise<void> {
  const userIds = new Map<string, string>();
  for (const u of demoUsers) {
    const [found] = await db
      .select({ id: user.id })
      .from(user)
      .where(eq(user.email, u.email))
      .limit(1);
    if (found) {
      userIds.set(u.email, found.id);
      continue;
    }
    const answer = await auth.api.signUpEmail({
      body: { name: u.name, email: u.email, password: demoPassword },
    });
    userIds.set(u.email, answer.user.id);
  }
  const idOf = (role: Role) => {
    const u = demoUsers.find((d) => d.role === role);
    const id = u && userIds.get(u.email);
    if (!id) throw new Error(`demo user for ${role} missing`);
    return id;
  };

  await db.transaction(async (tx) => {
    await tx.insert(organization).values({ ...label, createdAt: new Date('2026-09-01T09:00:00Z') });
    for (const u of demoUsers) {
      await tx.insert(member).values({
        id: `mem-${u.role}`,
        organizationId: label.id,
        userId: idOf(u.role),
        role: u.role,
      });
    }
    // The label's (invented) ISRC registrant code; codes already on demo recordings count
    // as handed out, so allocation continues after them.
    await tx.insert(isrcRegistrants).values({ organizationId: label.id, prefix: 'XQBRK' });
    let seed = 1;
    for (const [index, r] of demoReleases.entries()) {
      await tx.insert(releases).values({
        id: r.id,
        organizationId: label.id,
        title: r.title,
        artist: r.artist,
        labelName: label.name,
        catalogueNumber: r.catalogueNumber,
        upcEan: r.upcEan,
        releaseDate: r.releaseDate,
        genre: r.genre,
        language: 'en',
        // Stored without the ℗/© sign, which the screens and documents add.
        pLine: `2026 ${label.name}`,
        cLine: `2026 ${label.name}`,
        state: r.state,
        updatedAt: new Date(Date.UTC(2026, 10, 20 + index)),
      });
      for (const profileId of r.profiles) {
        await tx.insert(releaseProfiles).values({ releaseId: r.id, profileId });
      }
      if (r.sharedWithDistributor) {
        await tx
          .insert(releaseShares)
          .values({ releaseId: r.id, userId: idOf('distributor'), sharedBy: idOf('coordinator') });
      }
      for (const [position, t] of r.tracks.entries()) {
        const recordingId = `rec-${r.id.slice(4)}-${position + 1}`;
        await tx.insert(recordings).values({
          id: recordingId,
          organizationId: label.id,
          isrc: t.isrc,
          title: t.title,
          artist: r.artist,
          credits: [
            { name: t.composer, role: 'composer' },
            { name: r.artist, role: 'producer' },
            { name: 'Eli Stroud', role: 'mastering-engineer' },
          ],
        });
        if (t.isrc) {
          await tx.insert(isrcAllocations).values({
            isrc: t.isrc,
            organizationId: label.id,
            recordingId,
            allocatedBy: idOf('coordinator'),
          });
        }
        await tx.insert(tracks).values({
          id: `trk-${r.id.slice(4)}-${position + 1}`,
          releaseId: r.id,
          recordingId,
          position: position + 1,
          disc: 1,
          side: r.profiles.some((p) => p.startsWith('vinyl')) ? (position < 2 ? 'A' : 'B') : null,
          gapBeforeFrames: t.gapBeforeFrames,
        });
        const wav = demoWav(t.audio, seed++);
        // Measured with the same engine an upload uses, so the demo's checks are real.
        const measurements = await analyzeStreamInThread(Readable.from([wav]), wav.length);
        const fileName = `${String(position + 1).padStart(2, '0')} ${t.title}.wav`;
        await tx.insert(audioFiles).values({
          id: `aud-${recordingId.slice(4)}-v1`,
          recordingId,
          fileVersion: 1,
          objectKey: demoObjectKey(recordingId, fileName),
          originalName: fileName,
          sizeBytes: wav.length,
          sha256: createHash('sha256').update(wav).digest('hex'),
          sampleRateHz: t.audio.sampleRateHz,
          bitsPerSample: t.audio.bitDepth,
          channels: 2,
          durationSamples: Math.round(t.audio.seconds * t.audio.sampleRateHz),
          uploadedBy: idOf('engineer'),
          measurements,
          analysisState: 'done',
          analyzedAt: new Date(),
        });
      }
      await tx.insert(auditEvents).values({
        id: `aud-evt-${r.id}`,
        organizationId: label.id,
        releaseId: r.id,
        actorId: idOf('coordinator'),
        action: 'release.created',
        after: { title: r.title, artist: r.artist },
      });
    }
  });
}

const wavCache = new Map<number, Buffer>();

/** The demo file for `seed`, synthesised once per process. */
function demoWav(spec: Omit<SynthSpec, 'seed'>, seed: number): Buffer {
  let wav = wavCache.get(seed);
  if (!wav) {
    wav = synthesizeWav({ ...spec, seed });
    wavCache.set(seed, wav);
  }
  return wav;
}

function demoObjectKey(recordingId: string, fileName: string): string {
  return `audio/${label.id}/${recordingId}/v1/${fileName.replace(/[^A-Za-z0-9._-]+/g, '-')}`;
}

/** Uploads the synthesised file for each demo recording whose object is missing. */
async function uploadMissingAudio(
  db: Database,
  s3: { client: S3Client; bucket: string },
): Promise<number> {
  let uploaded = 0;
  let seed = 1;
  for (const r of demoReleases) {
    for (const [position] of r.tracks.entries()) {
      const t = r.tracks[position];
      if (!t) continue;
      const recordingId = `rec-${r.id.slice(4)}-${position + 1}`;
      const currentSeed = seed++;
      const [row] = await db
        .select({ objectKey: audioFiles.objectKey, sha256: audioFiles.sha256 })
        .from(audioFiles)
        .where(eq(audioFiles.recordingId, recordingId))
        .limit(1);
      if (!row || (await objectExists(s3, row.objectKey))) continue;
      const wav = demoWav(t.audio, currentSeed);
      const sha = createHash('sha256').update(wav).digest('hex');
      if (sha !== row.sha256)
        throw new Error(`demo audio for ${recordingId} no longer matches its checksum`);
      await putObject(s3, row.objectKey, wav, 'audio/wav');
      uploaded++;
    }
  }
  return uploaded;
}

/**
 * Signal Hill goes the whole way, as the label would take it in the product: the coordinator
 * adds its cover, runs the checks, the engineer signs off the audio, the coordinator the
 * metadata and approves, and the package is built. So the distributor has something to
 * download on first start, and the release's page tells a consistent story.
 */
async function packageApprovedDemoRelease(db: Database): Promise<void> {
  const releaseId = 'rel-signal-hill';
  const [existing] = await db
    .select({ id: packages.id })
    .from(packages)
    .where(eq(packages.releaseId, releaseId))
    .limit(1);
  if (existing) return;
  const actorFor = async (role: Role): Promise<Actor | null> => {
    const person = demoUsers.find((u) => u.role === role);
    const [row] = person
      ? await db.select({ id: user.id }).from(user).where(eq(user.email, person.email)).limit(1)
      : [];
    return person && row
      ? { userId: row.id, userName: person.name, organizationId: label.id, role }
      : null;
  };
  const coordinator = await actorFor('coordinator');
  const engineer = await actorFor('engineer');
  if (!coordinator || !engineer) return;
  const [release] = await db
    .select({ state: releases.state, version: releases.version })
    .from(releases)
    .where(eq(releases.id, releaseId));
  if (release?.state !== 'in_review') return;
  const [art] = await db
    .select({ id: artworks.id })
    .from(artworks)
    .where(eq(artworks.releaseId, releaseId))
    .limit(1);
  if (!art) {
    await uploadArtwork(db, coordinator, releaseId, {
      bytes: coverArtPng(3000, {
        skyTop: [38, 52, 84],
        skyHorizon: [214, 140, 96],
        sun: [246, 214, 160],
        land: [28, 30, 40],
        water: [30, 48, 72],
      }),
      originalName: 'Signal Hill front cover.png',
    });
  }
  await runChecks(db, coordinator, releaseId);
  await signOff(db, engineer, releaseId, 'audio');
  await signOff(db, coordinator, releaseId, 'metadata');
  const [current] = await db
    .select({ version: releases.version })
    .from(releases)
    .where(eq(releases.id, releaseId));
  await approveRelease(db, coordinator, releaseId, current?.version ?? release.version);
  await waitForPackageBuilds();
}
