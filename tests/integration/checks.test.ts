import { eq } from 'drizzle-orm';
import { describe, expect, inject, it } from 'vitest';
import { checkReportSchema, profileEntrySchema, profileListSchema } from '@/lib/api/checks-schemas';
import { createDatabase } from '@/lib/db/client';
import { audioFiles, recordings, releaseProfiles, releases, tracks } from '@/lib/db/schema';
import { Client, demoEmails, signedIn } from '../support/http';

const db = createDatabase(inject('databaseUrl'));

/** A release of our own, built from a demo recording's analysed file, so tests can change it. */
async function createFixtureRelease(id: string, profileIds: string[]): Promise<string> {
  const [source] = await db
    .select()
    .from(audioFiles)
    .where(eq(audioFiles.id, 'aud-night-ferries-1-v1'));
  if (!source) throw new Error('demo audio missing');
  await db.insert(releases).values({
    id,
    organizationId: 'org-brackwater',
    title: `Fixture ${id}`,
    artist: 'Fixture Artist',
    labelName: 'Brackwater Sound',
    upcEan: '2001234500036',
  });
  for (const profileId of profileIds)
    await db.insert(releaseProfiles).values({ releaseId: id, profileId });
  await db.insert(recordings).values({
    id: `rec-${id}`,
    organizationId: 'org-brackwater',
    title: 'Fixture Track',
    artist: 'Fixture Artist',
    credits: [{ name: 'A. Writer', role: 'composer' }],
  });
  await db.insert(tracks).values({
    id: `trk-${id}`,
    releaseId: id,
    recordingId: `rec-${id}`,
    position: 1,
    gapBeforeFrames: 150,
  });
  await db.insert(audioFiles).values({ ...source, id: `aud-${id}`, recordingId: `rec-${id}` });
  return id;
}

async function runChecks(client: Client, releaseId: string) {
  const response = await client.post(`/api/releases/${releaseId}/checks`, {});
  expect(response.status, await response.clone().text()).toBe(201);
  return checkReportSchema.parse(await response.json());
}

describe('running the checks', () => {
  it('finds the 48 kHz file on the CD master, and only there', async () => {
    const engineer = await signedIn(demoEmails.engineer);
    const report = await runChecks(engineer, 'rel-night-ferries');
    expect(report.profiles.map((p) => p.id).sort()).toEqual(['cd-master', 'streaming-standard']);

    const sampleRate = report.findings.filter((f) => f.ruleId === 'sampleRate');
    const failing = sampleRate.filter((f) => f.severity === 'failure');
    // IEC 60908 (Red Book): a CD master is 44.1 kHz; 'trk-night-ferries-2' was seeded at 48 kHz.
    expect(failing.map((f) => [f.profileId, f.trackId, f.measured, f.unit])).toEqual([
      ['cd-master', 'trk-night-ferries-2', 48_000, 'Hz'],
    ]);
    // The streaming profile accepts 48 kHz, so the same file passes there.
    expect(
      sampleRate.find(
        (f) => f.profileId === 'streaming-standard' && f.trackId === 'trk-night-ferries-2',
      )?.severity,
    ).toBe('pass');

    const cell = report.verdicts.find(
      (v) => v.profileId === 'cd-master' && v.trackId === 'trk-night-ferries-2',
    );
    expect(cell?.severity).toBe('failure');
    expect(report.summary.failures).toBe(
      report.findings.filter((f) => f.severity === 'failure').length,
    );
    expect(report.run?.ranBy).toBe('Eli Stroud');
    expect(report.stale).toBe(false);

    // The run is recorded: reading it back gives the same findings.
    const again = checkReportSchema.parse(
      await (await engineer.get('/api/releases/rel-night-ferries/checks')).json(),
    );
    expect(again.run?.id).toBe(report.run?.id);
    expect(again.findings).toEqual(report.findings);
  });

  it('every finding carries measured value, limit, unit and a sentence', async () => {
    const coordinator = await signedIn(demoEmails.coordinator);
    const report = await runChecks(coordinator, 'rel-night-ferries');
    for (const f of report.findings) {
      expect(f.message.length, f.key).toBeGreaterThan(10);
      expect(typeof f.unit, f.key).toBe('string');
    }
    const truePeak = report.findings.find(
      (f) => f.ruleId === 'truePeak' && f.trackId === 'trk-night-ferries-1',
    );
    expect(typeof truePeak?.measured).toBe('number');
    expect(truePeak?.unit).toBe('dBTP');
    expect(truePeak?.atSeconds).toBeGreaterThan(0);
  });

  it('a changed gap makes the last run stale until the checks run again', async () => {
    const id = await createFixtureRelease('rel-fixture-stale', ['cd-master']);
    const engineer = await signedIn(demoEmails.engineer);
    await runChecks(engineer, id);
    await db
      .update(tracks)
      .set({ gapBeforeFrames: 100 })
      .where(eq(tracks.id, `trk-${id}`));
    const stale = checkReportSchema.parse(
      await (await engineer.get(`/api/releases/${id}/checks`)).json(),
    );
    expect(stale.stale).toBe(true);
    const fresh = await runChecks(engineer, id);
    expect(fresh.stale).toBe(false);
    // IEC 60908 via REFERENCES.md §6: the first track needs a 2 s (150-frame) pre-gap.
    const preGap = fresh.findings.find((f) => f.ruleId === 'firstTrackPreGap');
    expect(preGap?.severity).not.toBe('pass');
    expect(preGap?.measured).toBeCloseTo(100 / 75, 6);
  });

  it('refuses without target profiles, and for roles that may not run or read them', async () => {
    const id = await createFixtureRelease('rel-fixture-none', []);
    const engineer = await signedIn(demoEmails.engineer);
    expect((await engineer.post(`/api/releases/${id}/checks`, {})).status).toBe(409);

    const distributor = await signedIn(demoEmails.distributor);
    expect((await distributor.post('/api/releases/rel-signal-hill/checks', {})).status).toBe(403);
    expect((await distributor.get('/api/releases/rel-signal-hill/checks')).status).toBe(403);
    expect((await new Client().get('/api/releases/rel-signal-hill/checks')).status).toBe(401);
    expect((await engineer.post('/api/releases/no-such-release/checks', {})).status).toBe(404);
  });
});

describe('custom delivery profiles', () => {
  it('an admin copies a built-in profile, edits it with optimistic locking, and a release can target it', async () => {
    const admin = await signedIn(demoEmails.admin);
    const created = await admin.post('/api/profiles', {
      name: 'Pressing plant B',
      copyOf: 'cd-master',
    });
    expect(created.status).toBe(201);
    const entry = profileEntrySchema.parse(await created.json());
    expect(entry.builtIn).toBe(false);
    expect(entry.basedOn).toBe('cd-master');
    expect(entry.profile.id).toMatch(/^custom-[0-9a-f]{10}$/);
    expect(entry.profile.rules.sampleRate?.allowedHz).toEqual([44_100]);

    const list = profileListSchema.parse(await (await admin.get('/api/profiles')).json());
    expect(list.profiles.filter((p) => p.builtIn).length).toBe(8);
    expect(list.profiles.map((p) => p.profile.name)).toContain('Pressing plant B');

    const rules = {
      ...entry.profile.rules,
      truePeak: { severity: 'failure' as const, ceilingDbtp: -2 },
    };
    const saved = await admin.request('PUT', `/api/profiles/${entry.profile.id}`, {
      name: 'Pressing plant B',
      description: 'Asks for 2 dB of true-peak headroom.',
      rules,
      version: 1,
    });
    expect(saved.status).toBe(200);
    expect(profileEntrySchema.parse(await saved.json()).profile.version).toBe(2);

    const stale = await admin.request('PUT', `/api/profiles/${entry.profile.id}`, {
      name: 'Pressing plant B',
      description: 'An edit made from an old copy.',
      rules,
      version: 1,
    });
    expect(stale.status).toBe(409);

    const id = await createFixtureRelease('rel-fixture-custom', [entry.profile.id]);
    const report = await runChecks(await signedIn(demoEmails.engineer), id);
    expect(report.profiles).toEqual([{ id: entry.profile.id, name: 'Pressing plant B' }]);
    const truePeak = report.findings.find((f) => f.ruleId === 'truePeak');
    expect(truePeak?.limit).toBe(-2);

    const inUse = await admin.request('DELETE', `/api/profiles/${entry.profile.id}`);
    expect(inUse.status).toBe(409);
  });

  it('refuses invalid rules with the reason, other roles, and edits to built-in profiles', async () => {
    const admin = await signedIn(demoEmails.admin);
    const invalid = await admin.post('/api/profiles', {
      name: 'Broken',
      rules: { truePeak: { severity: 'failure', ceilingDbtp: 'loud' } },
    });
    expect(invalid.status).toBe(400);
    const body = (await invalid.json()) as { error: { issues: { path: string }[] } };
    expect(body.error.issues.map((i) => i.path)).toContain('rules.truePeak.ceilingDbtp');

    const duplicate = await admin.post('/api/profiles', {
      name: 'Compact Disc production master',
      copyOf: 'cd-master',
    });
    expect(duplicate.status).toBe(409);

    const builtIn = await admin.request('PUT', '/api/profiles/cd-master', {
      name: 'x',
      description: '',
      rules: {},
      version: 1,
    });
    expect(builtIn.status).toBe(404);

    const engineer = await signedIn(demoEmails.engineer);
    expect(
      (await engineer.post('/api/profiles', { name: 'Mine', copyOf: 'cd-master' })).status,
    ).toBe(403);
    expect((await engineer.get('/api/profiles')).status).toBe(200);
  });
});
