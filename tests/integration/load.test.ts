/**
 * The short version of `npm run load`: the same core (scripts/lib/load.ts) against the test
 * server, 10 connections for 5 s while a 5-minute master is analysed in the background. It
 * asserts that nothing failed and that every planned endpoint was reached and answered the
 * JSON its schema describes. It does not assert on speed: latency is measured by the
 * script on a quiet machine (README, "Load"), never in a timed test.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { type LoadResult, runLoad } from '../../scripts/lib/load';
import { endpoints, labelReleaseIds, loadUsers } from '../../scripts/lib/load-plan';
import { createFixtureRelease, removeFixtureRelease } from './upload-support';

// The background upload goes to a release of this file's own, not to a demo release.
const releaseId = 'rel-load-fixture';
let result: LoadResult;

beforeAll(async () => {
  await createFixtureRelease(releaseId, ['cd-master']);
  result = await runLoad({
    baseUrl: inject('baseUrl'),
    connections: 10,
    durationSeconds: 5,
    analysis: { minutes: 5, releaseId },
    labelReleases: [...labelReleaseIds, releaseId],
    validateEvery: 1,
    // Commits during the load, so cached answers are recomputed while it runs.
    writesPerSecond: 4,
    writeReleases: [releaseId],
  });
}, 120_000);

afterAll(async () => {
  await removeFixtureRelease(releaseId);
});

describe('the load run (short)', () => {
  it('wrote during the load, and every write succeeded', () => {
    expect(result.writes?.sent).toBeGreaterThanOrEqual(10);
    expect(result.writes?.statusCounts).toEqual({ 201: result.writes?.sent });
  });

  it('has no connection errors, timeouts or non-2xx answers', () => {
    expect(result.client.errors).toBe(0);
    expect(result.client.timeouts).toBe(0);
    expect(result.client.non2xx).toBe(0);
    expect(Object.keys(result.client.statusCounts)).toEqual(['200']);
    expect(result.problems).toEqual([]);
    expect(result.ok).toBe(true);
  });

  it('reaches every planned request and checks its JSON against the schema', () => {
    // Each user gets what their pages fetch: the distributor only the shared release.
    expect(new Set(result.plan.map((p) => p.user))).toEqual(new Set(loadUsers.map((u) => u.email)));
    const distributor = result.plan.filter((p) => p.role === 'distributor');
    expect(new Set(distributor.map((p) => p.endpoint))).toEqual(
      new Set(['release list', 'release', 'artwork']),
    );
    expect(distributor.every((p) => p.releaseId === '' || p.releaseId === 'rel-signal-hill')).toBe(
      true,
    );
    const engineerPaths = result.plan.filter((p) => p.role === 'engineer').map((p) => p.path);
    expect(engineerPaths).toContain('/api/releases');
    expect(engineerPaths).toContain('/api/releases/rel-night-ferries/checks');
    expect(engineerPaths).toContain(`/api/releases/${releaseId}/uploads`);

    result.client.requests.forEach((stats, i) => {
      const planned = result.plan[i]!;
      const label = `${planned.path} as ${planned.user}`;
      expect(stats.responses, label).toBeGreaterThan(0);
      expect(stats.statusCounts, label).toEqual({ 200: stats.responses });
      // validateEvery: 1, so every answer was parsed with the endpoint's schema.
      expect(stats.validated, label).toBe(stats.responses);
      expect(stats.problems, label).toEqual([]);
    });
    expect(result.endpoints.map((e) => e.name).sort()).toEqual(endpoints.map((e) => e.name).sort());
  });

  it('reports throughput and latency figures (not asserted against a target)', () => {
    const { client } = result;
    expect(client.responses).toBe(
      result.client.requests.reduce((sum, stats) => sum + stats.responses, 0),
    );
    expect(client.requestsPerSecond).toBeGreaterThan(0);
    expect(client.latency.p50Ms).toBeLessThanOrEqual(client.latency.p95Ms);
    expect(client.latency.p95Ms).toBeLessThanOrEqual(client.latency.p99Ms);
  });

  it('ran a background analysis of the uploaded master to the end', () => {
    const analysis = result.analysis;
    expect(analysis?.stateAtLoadStart).toMatch(/^(pending|running|done)$/);
    expect(analysis?.finalState, analysis?.finalError ?? '').toBe('done');
    expect(analysis?.analysisSeconds).toBeGreaterThan(0);
  });
});
