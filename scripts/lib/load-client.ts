/**
 * The load generator, run in its own process (`node --import tsx`) so that autocannon's
 * client work never shares an event loop with the server or with the orchestrator (which
 * hosts the S3 fake the background analysis reads from). It receives the plan over IPC, runs
 * autocannon once over the whole request list, and answers with a summary: every response's
 * latency is kept, so the percentiles are exact (autocannon's own histogram has no p95).
 */
import autocannon from 'autocannon';
import {
  describeRequest,
  type LatencySummary,
  type PlannedRequest,
  summarizeLatency,
  validateAnswer,
} from './load-plan';

export type { LatencySummary };

export interface ClientRequest extends PlannedRequest {
  cookie: string;
}

export interface ClientConfig {
  baseUrl: string;
  connections: number;
  durationSeconds: number;
  requests: ClientRequest[];
  /** Validate the first few answers of each request, then every n-th (1 = all). */
  validateEvery: number;
}

export interface RequestStats {
  responses: number;
  statusCounts: Record<string, number>;
  validated: number;
  problems: string[];
}

export interface ClientSummary {
  durationSeconds: number;
  responses: number;
  requestsPerSecond: number;
  latency: LatencySummary;
  statusCounts: Record<string, number>;
  non2xx: number;
  errors: number;
  timeouts: number;
  /** One entry per planned request, same order. */
  requests: RequestStats[];
  /** Latency per endpoint name (all users and releases together). */
  endpointLatency: Record<string, LatencySummary>;
  /** CPU seconds the client process used during the run. */
  cpuSeconds: number;
  /** autocannon's own figures, for comparison (integer-millisecond histogram). */
  autocannon: { p50Ms: number; p99Ms: number; averageRps: number; sent: number };
}

export type ClientMessage =
  | { type: 'started' }
  | { type: 'done'; summary: ClientSummary }
  | { type: 'failed'; message: string };

/** What a connection's autocannon context holds between a request and its answer. */
interface PlanContext {
  planIndex?: number;
}

const validateFirst = 3;
const maxProblems = 5;

function runClient(config: ClientConfig): Promise<ClientSummary> {
  const stats: RequestStats[] = config.requests.map(() => ({
    responses: 0,
    statusCounts: {},
    validated: 0,
    problems: [],
  }));
  const latencies: number[] = [];
  const latenciesByEndpoint = new Map<string, number[]>();
  // autocannon calls a request's onResponse and then, synchronously, emits 'response' with
  // the latency: remember which request answered so the latency lands on its endpoint.
  let lastAnswered = -1;

  const record = (index: number, status: number, body: string) => {
    lastAnswered = index;
    const planned = config.requests[index];
    const entry = stats[index];
    if (!planned || !entry) return;
    entry.responses++;
    entry.statusCounts[status] = (entry.statusCounts[status] ?? 0) + 1;
    if (status < 200 || status >= 300) {
      if (entry.problems.length < maxProblems)
        entry.problems.push(`${describeRequest(planned)}: ${status} ${body.slice(0, 200)}`);
      return;
    }
    const sampled =
      entry.responses <= validateFirst || entry.responses % config.validateEvery === 0;
    if (!sampled) return;
    entry.validated++;
    const problem = validateAnswer(planned, body);
    if (problem && entry.problems.length < maxProblems)
      entry.problems.push(`${describeRequest(planned)}: ${problem}`);
  };

  // One dynamic request: every request any connection sends takes the next entry of the plan,
  // so the plan is walked evenly (all users, all endpoints) however short the run. autocannon
  // keeps a context per connection until its next request (one in flight, no pipelining), so
  // the answer finds its plan entry there.
  let next = 0;
  const requests = [
    {
      method: 'GET' as const,
      setupRequest: (request: autocannon.Request, context: object) => {
        const index = next++ % config.requests.length;
        const planned = config.requests[index]!;
        (context as PlanContext).planIndex = index;
        return {
          ...request,
          path: planned.path,
          headers: { ...request.headers, cookie: planned.cookie, accept: 'application/json' },
        };
      },
      onResponse: (status: number, body: string, context: object) =>
        record((context as PlanContext).planIndex ?? -1, status, body),
    },
  ];

  let cpuAtStart = process.cpuUsage();
  return new Promise((resolve, reject) => {
    const instance = autocannon(
      {
        url: config.baseUrl,
        connections: config.connections,
        duration: config.durationSeconds,
        requests,
        pipelining: 1,
        timeout: 10,
      },
      (error: unknown, result) => {
        if (error) return reject(error instanceof Error ? error : new Error(String(error)));
        const endpointLatency: Record<string, LatencySummary> = {};
        for (const [name, values] of latenciesByEndpoint)
          endpointLatency[name] = summarizeLatency(values);
        const statusCounts: Record<string, number> = {};
        for (const entry of stats)
          for (const [status, count] of Object.entries(entry.statusCounts))
            statusCounts[status] = (statusCounts[status] ?? 0) + count;
        const latency = summarizeLatency(latencies);
        const cpu = process.cpuUsage(cpuAtStart);
        resolve({
          durationSeconds: result.duration,
          responses: latency.count,
          requestsPerSecond: latency.count / result.duration,
          latency,
          statusCounts,
          non2xx: result.non2xx,
          errors: result.errors,
          timeouts: result.timeouts,
          requests: stats,
          endpointLatency,
          cpuSeconds: (cpu.user + cpu.system) / 1e6,
          autocannon: {
            p50Ms: result.latency.p50,
            p99Ms: result.latency.p99,
            averageRps: result.requests.average,
            sent: result.requests.sent,
          },
        });
      },
    );
    instance.on('start', () => {
      cpuAtStart = process.cpuUsage();
      void send({ type: 'started' });
    });
    instance.on('response', (_client, _status, _bytes, responseTime) => {
      latencies.push(responseTime);
      const planned = config.requests[lastAnswered];
      if (!planned) return;
      const list = latenciesByEndpoint.get(planned.endpoint);
      if (list) list.push(responseTime);
      else latenciesByEndpoint.set(planned.endpoint, [responseTime]);
    });
  });
}

function send(message: ClientMessage): Promise<void> {
  return new Promise((resolve) => {
    if (!process.send) return resolve();
    process.send(message, () => resolve());
  });
}

// Only as a child process with an IPC channel: wait for the plan, run, answer, exit.
if (process.send) {
  process.on('disconnect', () => process.exit(1));
  process.once('message', (config: ClientConfig) => {
    runClient(config)
      .then((summary) => send({ type: 'done', summary }))
      .catch((error: unknown) =>
        send({ type: 'failed', message: error instanceof Error ? error.message : String(error) }),
      )
      .finally(() => process.exit(0));
  });
}
