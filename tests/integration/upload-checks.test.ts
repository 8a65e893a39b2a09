/** A new master re-runs the release's checks by itself, and a failing run is e-mailed. */
import { afterAll, describe, expect, it } from 'vitest';
import { checkReportSchema } from '@/lib/api/checks-schemas';
import { demoEmails } from '../support/http';
import { waitForMail } from '../support/mail';
import {
  createFixtureRelease,
  removeFixtureRelease,
  Session,
  sineWav,
  waitForAnalyses,
} from './upload-support';

const releaseId = 'rel-upload-checks';

afterAll(async () => {
  await removeFixtureRelease(releaseId);
});

describe('checks after an upload', () => {
  it('a 48 kHz master uploaded to a CD release fails the checks at once and the label is told', async () => {
    await createFixtureRelease(releaseId, ['cd-master']);
    const engineer = await Session.signIn(demoEmails.engineer);
    const uploaded = await engineer.upload(
      releaseId,
      sineWav({ seconds: 5, sampleRateHz: 48_000, bits: 16 }),
      {
        name: 'Wrong Rate.wav',
      },
    );
    expect(uploaded.status).toBe(201);
    await waitForAnalyses(engineer, releaseId);

    let report = checkReportSchema.parse(
      await (await engineer.get(`/api/releases/${releaseId}/checks`)).json(),
    );
    for (let i = 0; i < 50 && !report.run; i++) {
      await new Promise((r) => setTimeout(r, 100));
      report = checkReportSchema.parse(
        await (await engineer.get(`/api/releases/${releaseId}/checks`)).json(),
      );
    }
    expect(report.run?.ranBy).toBe('Quayside (after an upload)');
    // IEC 60908 (Red Book): a CD master is 44.1 kHz.
    const failure = report.findings.find((f) => f.ruleId === 'sampleRate');
    expect([failure?.severity, failure?.measured]).toEqual(['failure', 48_000]);

    for (const address of [demoEmails.engineer, demoEmails.coordinator]) {
      const [mail] = await waitForMail(
        address,
        new RegExp(`^Checks failed: Upload fixture ${releaseId}$`),
      );
      expect(mail?.text, address).toMatch(/found \d+ failures? and \d+ warnings?/);
    }
  });
});
