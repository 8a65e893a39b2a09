/** A new master re-runs the release's checks by itself, and a failing run is e-mailed. */
import { afterAll, describe, expect, inject, it } from 'vitest';
import { checkReportSchema } from '@/lib/api/checks-schemas';
import { demoEmails } from '../support/http';
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

async function mailTo(address: string, subject: RegExp) {
  for (let i = 0; i < 50; i++) {
    const answer = await fetch(new URL('/messages', inject('mailUrl')));
    const { messages } = (await answer.json()) as {
      messages: { to: string[]; subject: string; text: string }[];
    };
    const found = messages.filter((m) => m.to.includes(address) && subject.test(m.subject));
    if (found.length) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
  return [];
}

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
      const [mail] = await mailTo(
        address,
        new RegExp(`^Checks failed: Upload fixture ${releaseId}$`),
      );
      expect(mail?.text, address).toMatch(/found \d+ failures? and \d+ warnings?/);
    }
  });
});
