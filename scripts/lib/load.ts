/**
 * The load measurement against a running server (`npm run load` sets one up; the integration
 * test reuses the test server): signs in as the demo users, checks every planned endpoint
 * once, uploads a long synthesised master so an analysis runs in the server's worker pool,
 * then drives the read endpoints with autocannon (in its own process, see `load-client.ts`)
 * while polling that analysis. Returns figures and every problem seen; prints nothing
 * itself except through `log`.
 */
import { type ChildProcess, fork } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { request as httpRequest } from 'node:http';
import { fileURLToPath } from 'node:url';
import {
  type UploadResult,
  uploadResultSchema,
  uploadStatusSchema,
} from '../../src/lib/api/schemas';
import { pcmWavHeader } from '../../src/lib/audio/wav-header';
import { can } from '../../src/lib/auth/permissions';
import type { ClientConfig, ClientMessage, ClientRequest, ClientSummary } from './load-client';
import {
  demoLoadPassword,
  describeRequest,
  type EndpointName,
  endpoints,
  type LatencySummary,
  type LoadUser,
  labelReleaseIds,
  loadUsers,
  type PlannedRequest,
  planRequests,
  summarizeLatency,
  validateAnswer,
} from './load-plan';

export interface LoadOptions {
  /** Where the server answers, e.g. http://localhost:4321 (also sent as Origin on sign-in). */
  baseUrl: string;
  connections: number;
  durationSeconds: number;
  /** The background analysis: a master of `minutes` uploaded to `releaseId`; null for none. */
  analysis: { minutes: number; releaseId: string } | null;
  users?: LoadUser[];
  /** Releases the label's users open (default: the three demo releases). */
  labelReleases?: string[];
  /** Releases the distributor opens (default: Signal Hill). */
  sharedReleases?: string[];
  /** Validate the first answers of each request, then every n-th (default 100; 1 = all). */
  validateEvery?: number;
  /**
   * Writes during the load: this many check runs per second (POST …/checks by the engineer,
   * over the label's releases). Each one is a commit, so every cached answer is computed
   * afresh after it. Default 0 (none): the measured scenario is read-only.
   */
  writesPerSecond?: number;
  /** Releases whose checks the writer runs (default: `labelReleases`). */
  writeReleases?: string[];
  /** The server's process id, to report its CPU time during the load (Linux /proc). */
  serverPid?: number;
  log?: (line: string) => void;
}

export interface ServerCpu {
  /** CPU seconds of the server's main thread (its event loop: every request is handled there). */
  mainThreadSeconds: number;
  /** CPU seconds of its other threads: the analysis workers, libuv's pool. */
  otherThreadsSeconds: number;
}

export interface AnalysisReport {
  releaseId: string;
  audioFileId: string;
  minutes: number;
  bytes: number;
  uploadSeconds: number;
  stateAtLoadStart: string;
  stateAtLoadEnd: string;
  /** 0…1 when the load ended, if the analysis was still under way. */
  progressAtLoadEnd: number | null;
  stillRunningAtLoadEnd: boolean;
  finalState: string;
  finalError: string | null;
  /** From the upload's answer (the analysis is queued then) to the poll that saw it end. */
  analysisSeconds: number | null;
  pollIntervalMs: number;
}

export interface EndpointReport {
  name: EndpointName;
  /** Planned requests (user × release) for this endpoint. */
  planned: number;
  responses: number;
  non2xx: number;
  validated: number;
  latency: LatencySummary | null;
}

export interface WriteReport {
  perSecond: number;
  /** What was written, e.g. "check runs (POST /api/releases/:id/checks)". */
  what: string;
  sent: number;
  /** Answers by status code. */
  statusCounts: Record<string, number>;
  latency: LatencySummary | null;
}

export interface LoadResult {
  connections: number;
  durationSeconds: number;
  users: string[];
  plan: PlannedRequest[];
  client: ClientSummary;
  endpoints: EndpointReport[];
  analysis: AnalysisReport | null;
  writes: WriteReport | null;
  /** Server CPU time between the load's start and end, when `serverPid` was given. */
  serverCpu: ServerCpu | null;
  /** Everything that went wrong: non-2xx samples, wrong JSON, requests never answered. */
  problems: string[];
  /** No connection errors, timeouts, non-2xx answers or problems. */
  ok: boolean;
}

const projectRoot = fileURLToPath(new URL('../../', import.meta.url));
const clientModule = fileURLToPath(new URL('./load-client.ts', import.meta.url));
const runningClients = new Set<ChildProcess>();

/** Kills autocannon client processes still running (for Ctrl-C and failures). */
export function stopLoadClients(): void {
  for (const child of runningClients) child.kill('SIGKILL');
  runningClients.clear();
}

// ── Sessions ─────────────────────────────────────────────────────────────────────────────

/** Signs in through better-auth's e-mail endpoint and returns the Cookie header to send. */
export async function signInForCookie(baseUrl: string, email: string): Promise<string> {
  const response = await fetch(new URL('/api/auth/sign-in/email', baseUrl), {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/json', origin: new URL(baseUrl).origin },
    body: JSON.stringify({ email, password: demoLoadPassword }),
  });
  if (response.status !== 200)
    throw new Error(`sign-in as ${email} answered ${response.status}: ${await response.text()}`);
  const cookie = response.headers
    .getSetCookie()
    .map((c) => c.split(';')[0]?.trim() ?? '')
    .filter(Boolean)
    .join('; ');
  if (!cookie) throw new Error(`sign-in as ${email} set no session cookie`);
  return cookie;
}

// ── The long master ──────────────────────────────────────────────────────────────────────

const sampleRateHz = 48_000;
const channels = 2;
const bytesPerSample = 3;
const frameBytes = channels * bytesPerSample;
const loopSeconds = 10;

/**
 * Ten seconds of a slowly pulsing two-note chord, a little different left and right, peaking
 * near −6 dBFS. Every partial and the pulse complete whole cycles in ten seconds, so the loop
 * repeats without a click.
 */
function chordLoop(): Buffer {
  const frames = sampleRateHz * loopSeconds;
  const out = Buffer.alloc(frames * frameBytes);
  const full = 2 ** 23 - 1;
  const partials = [
    [220, 246.9],
    [329.6, 370.1],
  ] as const;
  for (let i = 0; i < frames; i++) {
    const t = i / sampleRateHz;
    const pulse = 0.75 + 0.25 * Math.sin(2 * Math.PI * 0.5 * t);
    for (let ch = 0; ch < channels; ch++) {
      const [low, high] = partials[ch]!;
      const value =
        pulse * (0.3 * Math.sin(2 * Math.PI * low * t) + 0.2 * Math.sin(2 * Math.PI * high * t));
      out.writeIntLE(Math.round(value * full), (i * channels + ch) * bytesPerSample, 3);
    }
  }
  return out;
}

/** Size in bytes of the synthesised master of `minutes`; refuses what RIFF cannot hold. */
export function longMasterBytes(minutes: number): number {
  const dataBytes = Math.round(minutes * 60 * sampleRateHz) * frameBytes;
  if (36 + dataBytes > 0xffffffff)
    throw new Error(
      `A ${minutes}-minute 48 kHz 24-bit stereo WAV exceeds 4 GiB; use 248 or fewer.`,
    );
  return 44 + dataBytes;
}

/** The master as chunks, generated as they are sent: never on disk, never whole in memory. */
function* generateLongMaster(minutes: number): Generator<Buffer> {
  const dataBytes = longMasterBytes(minutes) - 44;
  yield pcmWavHeader({ sampleRateHz, bits: 24, channels, dataBytes });
  const loop = chordLoop();
  let left = dataBytes;
  while (left > 0) {
    const n = Math.min(left, loop.length);
    yield n === loop.length ? loop : loop.subarray(0, n);
    left -= n;
  }
}

/** Streams the master through the real upload route as `cookie`'s user. */
function uploadLongMaster(options: {
  baseUrl: string;
  cookie: string;
  releaseId: string;
  minutes: number;
}): Promise<UploadResult> {
  const base = new URL(options.baseUrl);
  const query = new URLSearchParams({
    uploadId: randomUUID(),
    name: `Load Test Long Form ${options.minutes} min.wav`,
  });
  const chunks = generateLongMaster(options.minutes);
  return new Promise((resolve, reject) => {
    const req = httpRequest(
      {
        host: base.hostname,
        port: base.port,
        method: 'POST',
        path: `/api/releases/${encodeURIComponent(options.releaseId)}/uploads?${query}`,
        headers: {
          origin: base.origin,
          cookie: options.cookie,
          'content-type': 'audio/wav',
          'content-length': String(longMasterBytes(options.minutes)),
        },
      },
      (res) => {
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (c: string) => {
          text += c;
        });
        res.on('end', () => {
          if (res.statusCode !== 201)
            return reject(
              new Error(`the upload answered ${res.statusCode}: ${text.slice(0, 300)}`),
            );
          try {
            resolve(uploadResultSchema.parse(JSON.parse(text)));
          } catch (error) {
            reject(error);
          }
        });
      },
    );
    req.on('error', reject);
    // Write with back-pressure; stop early if the server answers before the end (a refusal).
    const pump = () => {
      for (;;) {
        if (req.destroyed) return;
        const next = chunks.next();
        if (next.done) return req.end();
        if (!req.write(next.value)) return req.once('drain', pump);
      }
    };
    pump();
  });
}

async function analysisState(
  baseUrl: string,
  cookie: string,
  releaseId: string,
  audioFileId: string,
): Promise<{ state: string; progress: number | null; error: string | null }> {
  const response = await fetch(
    new URL(`/api/releases/${encodeURIComponent(releaseId)}/uploads`, baseUrl),
    { headers: { cookie, accept: 'application/json' } },
  );
  if (response.status !== 200) throw new Error(`upload status answered ${response.status}`);
  const status = uploadStatusSchema.parse(await response.json());
  const file = status.tracks.map((t) => t.current).find((c) => c?.id === audioFileId);
  if (!file) return { state: 'replaced', progress: null, error: null };
  return { state: file.analysisState, progress: file.analysisProgress, error: file.analysisError };
}

const busy = (state: string) => state === 'pending' || state === 'running';

// ── CPU time of the server process ───────────────────────────────────────────────────────

/** USER_HZ, the unit of /proc's CPU times: 100 on Linux (sysconf(_SC_CLK_TCK)). */
const clockTicksPerSecond = 100;

interface CpuSample {
  /** utime + stime of the whole process, exited threads included. */
  totalTicks: number;
  /** utime + stime of the main thread (thread id = process id). */
  mainTicks: number;
}

function ticksOf(statLine: string): number {
  // Fields after the command name in parentheses: state is field 3, utime 14, stime 15.
  const fields = statLine.slice(statLine.lastIndexOf(')') + 2).split(' ');
  return Number(fields[11]) + Number(fields[12]);
}

function readProcessCpu(pid: number): CpuSample | null {
  try {
    return {
      totalTicks: ticksOf(readFileSync(`/proc/${pid}/stat`, 'utf8')),
      mainTicks: ticksOf(readFileSync(`/proc/${pid}/task/${pid}/stat`, 'utf8')),
    };
  } catch {
    return null;
  }
}

// ── The autocannon client process ────────────────────────────────────────────────────────

function runClientProcess(config: ClientConfig, onStarted: () => void): Promise<ClientSummary> {
  const child = fork(clientModule, [], {
    cwd: projectRoot,
    execArgv: ['--import', 'tsx'],
    stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
  });
  runningClients.add(child);
  return new Promise((resolve, reject) => {
    let settled = false;
    child.on('message', (message: ClientMessage) => {
      if (message.type === 'started') onStarted();
      else if (message.type === 'done') {
        settled = true;
        resolve(message.summary);
      } else {
        settled = true;
        reject(new Error(`the load client failed: ${message.message}`));
      }
    });
    child.once('error', reject);
    child.once('exit', (code, signal) => {
      runningClients.delete(child);
      if (!settled)
        reject(new Error(`the load client exited (${signal ?? code}) before answering`));
    });
    child.send(config);
  });
}

// ── The measurement ──────────────────────────────────────────────────────────────────────

export async function runLoad(options: LoadOptions): Promise<LoadResult> {
  const log = options.log ?? (() => undefined);
  const users = options.users ?? loadUsers;
  const baseUrl = options.baseUrl;

  const cookies = new Map<string, string>();
  await Promise.all(
    users.map(async (u) => cookies.set(u.email, await signInForCookie(baseUrl, u.email))),
  );
  log(`Signed in     ${users.map((u) => u.email).join(', ')}`);

  const plan = planRequests({
    users,
    labelReleases: options.labelReleases,
    sharedReleases: options.sharedReleases,
  });
  const requests: ClientRequest[] = plan.map((p) => ({ ...p, cookie: cookies.get(p.user) ?? '' }));

  // Every request once before the load, answer checked in full: fail fast and warm up.
  const preflight: string[] = [];
  for (const request of requests) {
    const response = await fetch(new URL(request.path, baseUrl), {
      headers: { cookie: request.cookie, accept: 'application/json' },
    });
    const body = await response.text();
    const problem =
      response.status === 200
        ? validateAnswer(request, body)
        : `${response.status} ${body.slice(0, 200)}`;
    if (problem) preflight.push(`${describeRequest(request)}: ${problem}`);
  }
  if (preflight.length)
    throw new Error(`The endpoints answered wrongly before the load:\n  ${preflight.join('\n  ')}`);
  log(`Plan          ${plan.length} requests per round (${users.length} users), each checked once`);

  // The background analysis: upload first, so the analysis is queued when the load begins.
  const engineer = users.find((u) => u.role === 'engineer' || u.role === 'admin');
  let upload: { result: UploadResult; seconds: number; answeredAt: number } | null = null;
  const pollIntervalMs = 500;
  if (options.analysis) {
    if (!engineer) throw new Error('The background analysis needs an engineer or admin user.');
    const { minutes, releaseId } = options.analysis;
    const bytes = longMasterBytes(minutes);
    log(
      `Uploading     a ${minutes}-minute 48 kHz 24-bit stereo master (${(bytes / 1e9).toFixed(2)} GB) to ${releaseId}…`,
    );
    const started = performance.now();
    const result = await uploadLongMaster({
      baseUrl,
      cookie: cookies.get(engineer.email) ?? '',
      releaseId,
      minutes,
    });
    const answeredAt = performance.now();
    upload = { result, seconds: (answeredAt - started) / 1000, answeredAt };
    log(`Uploaded      in ${upload.seconds.toFixed(1)} s; its analysis is queued`);
  }

  const poll = async () => {
    if (!upload || !options.analysis || !engineer) return null;
    return analysisState(
      baseUrl,
      cookies.get(engineer.email) ?? '',
      options.analysis.releaseId,
      upload.result.audioFileId,
    );
  };
  let endedAt: number | null = null;
  let lastState: Awaited<ReturnType<typeof poll>> = null;
  const observe = async () => {
    const state = await poll();
    if (!state || !upload) return state;
    lastState = state;
    if (!busy(state.state) && endedAt === null) endedAt = performance.now();
    return state;
  };
  // One poll at a time: under load an answer can take longer than the interval.
  let pollInFlight = false;
  const observeInBackground = () => {
    if (pollInFlight) return;
    pollInFlight = true;
    observe()
      .catch(() => undefined)
      .finally(() => {
        pollInFlight = false;
      });
  };
  const stateAtStart = await observe();

  // The writer: one check run at a time, at most `writesPerSecond`, while the load runs.
  const writesPerSecond = options.writesPerSecond ?? 0;
  const writeReleases = options.writeReleases ?? options.labelReleases ?? labelReleaseIds;
  const writer = users.find((u) => can(u.role, 'check:run') && u.role !== 'distributor');
  const writeLatencies: number[] = [];
  const writeStatus: Record<string, number> = {};
  let writesSent = 0;
  let writeInFlight = false;
  const writeOnce = () => {
    if (writeInFlight || !writer) return;
    writeInFlight = true;
    const releaseId = writeReleases[writesSent % writeReleases.length]!;
    writesSent += 1;
    const started = performance.now();
    fetch(new URL(`/api/releases/${encodeURIComponent(releaseId)}/checks`, baseUrl), {
      method: 'POST',
      headers: { cookie: cookies.get(writer.email) ?? '', origin: baseUrl },
    })
      .then(async (response) => {
        await response.arrayBuffer();
        writeStatus[response.status] = (writeStatus[response.status] ?? 0) + 1;
        writeLatencies.push(performance.now() - started);
      })
      .catch(() => {
        writeStatus.error = (writeStatus.error ?? 0) + 1;
      })
      .finally(() => {
        writeInFlight = false;
      });
  };

  let cpuAtStart: CpuSample | null = null;
  log(`Load          ${options.connections} connections for ${options.durationSeconds} s…`);
  let polling: ReturnType<typeof setInterval> | null = null;
  let writing: ReturnType<typeof setInterval> | null = null;
  const client = await runClientProcess(
    {
      baseUrl,
      connections: options.connections,
      durationSeconds: options.durationSeconds,
      requests,
      validateEvery: options.validateEvery ?? 100,
    },
    () => {
      cpuAtStart = options.serverPid ? readProcessCpu(options.serverPid) : null;
      if (upload) polling = setInterval(observeInBackground, pollIntervalMs);
      if (writesPerSecond > 0 && writer) writing = setInterval(writeOnce, 1000 / writesPerSecond);
    },
  ).finally(() => {
    if (polling) clearInterval(polling);
    if (writing) clearInterval(writing);
  });
  while (writeInFlight) await new Promise((r) => setTimeout(r, 20));
  const writes: WriteReport | null =
    writesPerSecond > 0 && writer
      ? {
          perSecond: writesPerSecond,
          what: `check runs by ${writer.email} (POST /api/releases/:id/checks)`,
          sent: writesSent,
          statusCounts: writeStatus,
          latency: writeLatencies.length ? summarizeLatency(writeLatencies) : null,
        }
      : null;
  const cpuAtEnd = options.serverPid ? readProcessCpu(options.serverPid) : null;
  const stateAtEnd = await observe();
  const start = cpuAtStart as CpuSample | null;
  const serverCpu: ServerCpu | null =
    start && cpuAtEnd
      ? {
          mainThreadSeconds: (cpuAtEnd.mainTicks - start.mainTicks) / clockTicksPerSecond,
          otherThreadsSeconds:
            (cpuAtEnd.totalTicks - cpuAtEnd.mainTicks - (start.totalTicks - start.mainTicks)) /
            clockTicksPerSecond,
        }
      : null;

  // Let the analysis finish (its duration is part of the report; the server stops after).
  if (upload && stateAtEnd && busy(stateAtEnd.state)) {
    log('Waiting       for the background analysis to finish…');
    const deadline = performance.now() + 60_000 + upload.result.sizeBytes / 4e3;
    while (endedAt === null && performance.now() < deadline) {
      await new Promise((r) => setTimeout(r, pollIntervalMs));
      await observe();
    }
  }

  let analysis: AnalysisReport | null = null;
  if (upload && options.analysis) {
    const final = lastState as Awaited<ReturnType<typeof poll>>;
    analysis = {
      releaseId: options.analysis.releaseId,
      audioFileId: upload.result.audioFileId,
      minutes: options.analysis.minutes,
      bytes: upload.result.sizeBytes,
      uploadSeconds: upload.seconds,
      stateAtLoadStart: stateAtStart?.state ?? 'unknown',
      stateAtLoadEnd: stateAtEnd?.state ?? 'unknown',
      progressAtLoadEnd: stateAtEnd?.progress ?? null,
      stillRunningAtLoadEnd: stateAtEnd ? busy(stateAtEnd.state) : false,
      finalState: final?.state ?? 'unknown',
      finalError: final?.error ?? null,
      analysisSeconds: endedAt === null ? null : (endedAt - upload.answeredAt) / 1000,
      pollIntervalMs,
    };
  }

  const problems: string[] = [];
  client.requests.forEach((stats, i) => {
    const planned = plan[i]!;
    if (stats.responses === 0) problems.push(`${describeRequest(planned)}: never answered`);
    else if (stats.validated === 0) problems.push(`${describeRequest(planned)}: no answer checked`);
    problems.push(...stats.problems);
  });
  if (writes) {
    const failed = Object.entries(writes.statusCounts).filter(([code]) => code !== '201');
    for (const [code, n] of failed) problems.push(`${n} write(s) answered ${code}`);
  }
  if (analysis && analysis.finalState !== 'done')
    problems.push(
      `the background analysis ended ${analysis.finalState}${analysis.finalError ? `: ${analysis.finalError}` : ''}`,
    );

  const endpointReports: EndpointReport[] = endpoints
    .map((e) => {
      const indexes = plan.flatMap((p, i) => (p.endpoint === e.name ? [i] : []));
      const stats = indexes.map((i) => client.requests[i]!);
      return {
        name: e.name,
        planned: indexes.length,
        responses: stats.reduce((a, s) => a + s.responses, 0),
        non2xx: stats.reduce(
          (a, s) =>
            a +
            Object.entries(s.statusCounts)
              .filter(([code]) => !code.startsWith('2'))
              .reduce((b, [, n]) => b + n, 0),
          0,
        ),
        validated: stats.reduce((a, s) => a + s.validated, 0),
        latency: client.endpointLatency[e.name] ?? null,
      };
    })
    .filter((e) => e.planned > 0);

  return {
    connections: options.connections,
    durationSeconds: options.durationSeconds,
    users: users.map((u) => u.email),
    plan,
    client,
    endpoints: endpointReports,
    analysis,
    writes,
    serverCpu,
    problems,
    ok:
      client.errors === 0 && client.timeouts === 0 && client.non2xx === 0 && problems.length === 0,
  };
}

// ── The printed report ───────────────────────────────────────────────────────────────────

const ms = (v: number) => `${v.toFixed(1)} ms`;

export const p95TargetMs = 100;

export function formatLoadReport(result: LoadResult): string {
  const c = result.client;
  const lines: string[] = [];
  lines.push('');
  lines.push(
    `Load: ${result.connections} connections, ${c.durationSeconds.toFixed(1)} s, ${result.users.length} users, ${result.plan.length} requests per round`,
  );
  lines.push(`  requests/s        ${c.requestsPerSecond.toFixed(1)}`);
  lines.push(
    `  latency           p50 ${ms(c.latency.p50Ms)}   p95 ${ms(c.latency.p95Ms)}   p99 ${ms(c.latency.p99Ms)}   (mean ${ms(c.latency.meanMs)}, max ${ms(c.latency.maxMs)})`,
  );
  lines.push(`  total requests    ${c.responses}`);
  lines.push(
    `  status codes      ${Object.entries(c.statusCounts)
      .map(([code, n]) => `${code}: ${n}`)
      .join(', ')}`,
  );
  lines.push(`  non-2xx           ${c.non2xx}`);
  lines.push(`  errors            ${c.errors} (timeouts ${c.timeouts})`);
  if (result.serverCpu) {
    const { mainThreadSeconds, otherThreadsSeconds } = result.serverCpu;
    lines.push(
      `  server CPU        main thread ${mainThreadSeconds.toFixed(1)} s (${((mainThreadSeconds * 1000) / Math.max(1, c.responses)).toFixed(1)} ms per request), other threads ${otherThreadsSeconds.toFixed(1)} s`,
    );
  }
  lines.push(`  client CPU        ${c.cpuSeconds.toFixed(1)} s (autocannon process)`);
  lines.push(
    `  autocannon's own  p50 ${c.autocannon.p50Ms} ms, p99 ${c.autocannon.p99Ms} ms, ${c.autocannon.averageRps.toFixed(1)} req/s (per-second average)`,
  );
  lines.push('');
  lines.push('  endpoint        planned  responses  checked  non-2xx      p50      p95      p99');
  for (const e of result.endpoints) {
    const l = e.latency;
    lines.push(
      `  ${e.name.padEnd(14)} ${String(e.planned).padStart(8)} ${String(e.responses).padStart(10)} ${String(e.validated).padStart(8)} ${String(e.non2xx).padStart(8)} ${(l ? ms(l.p50Ms) : '–').padStart(8)} ${(l ? ms(l.p95Ms) : '–').padStart(8)} ${(l ? ms(l.p99Ms) : '–').padStart(8)}`,
    );
  }
  lines.push('');
  const w = result.writes;
  if (w) {
    lines.push(
      `Writes during the load: ${w.sent} ${w.what}, up to ${w.perSecond} per second; answers ${Object.entries(
        w.statusCounts,
      )
        .map(([code, n]) => `${code}: ${n}`)
        .join(', ')}${w.latency ? `; p50 ${ms(w.latency.p50Ms)}, p95 ${ms(w.latency.p95Ms)}` : ''}`,
    );
    lines.push(
      '  each one a commit, after which every cached session and answer is computed afresh',
    );
  } else {
    lines.push('Writes during the load: none');
  }
  const a = result.analysis;
  if (a) {
    lines.push(
      `Background analysis: ${a.minutes}-minute 48 kHz 24-bit stereo master, ${(a.bytes / 1e9).toFixed(2)} GB, uploaded in ${a.uploadSeconds.toFixed(1)} s`,
    );
    lines.push(
      `  state at load start ${a.stateAtLoadStart}; at load end ${a.stateAtLoadEnd}${a.progressAtLoadEnd === null ? '' : ` (${Math.round(a.progressAtLoadEnd * 100)} % read)`}`,
    );
    lines.push(`  still running when the load ended: ${a.stillRunningAtLoadEnd ? 'yes' : 'no'}`);
    lines.push(
      `  analysis ${a.finalState}${a.finalError ? ` (${a.finalError})` : ''}${a.analysisSeconds === null ? '' : ` in ${a.analysisSeconds.toFixed(1)} s (queued at upload, polled every ${a.pollIntervalMs} ms)`}`,
    );
  } else {
    lines.push('Background analysis: none (--no-analysis)');
  }
  lines.push('');
  lines.push(
    `Target: p95 under ${p95TargetMs} ms: ${c.latency.p95Ms < p95TargetMs ? 'yes' : 'no'} (${ms(c.latency.p95Ms)})`,
  );
  lines.push(
    `        errors: ${c.errors + c.non2xx + result.problems.length} (connection errors ${c.errors}, non-2xx ${c.non2xx}, other problems ${result.problems.length})`,
  );
  for (const problem of result.problems.slice(0, 20)) lines.push(`  ! ${problem}`);
  if (result.problems.length > 20) lines.push(`  ! … and ${result.problems.length - 20} more`);
  return lines.join('\n');
}
