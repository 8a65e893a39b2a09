/**
 * What the load measurement asks for: the demo users, and per user the read endpoints their
 * pages call (the release list, and the release page's panels), each with the shared schema
 * its answer must match. Used by the orchestrator (`load.ts`) and the autocannon client
 * process (`load-client.ts`), so both agree on what "the JSON it should" means.
 */
import type { z } from 'zod';
import { checkReportSchema } from '../../src/lib/api/checks-schemas';
import { artworkResponseSchema } from '../../src/lib/api/metadata-schemas';
import {
  releaseDetailSchema,
  releaseListSchema,
  uploadStatusSchema,
} from '../../src/lib/api/schemas';
import { auditResponseSchema, workflowStatusSchema } from '../../src/lib/api/workflow-schemas';
import { can, type Permission, type Role } from '../../src/lib/auth/permissions';

export const demoLoadPassword = 'quayside-demo';

/** The label's demo releases and the one shared with the distributor (seeds/demo.ts). */
export const labelReleaseIds = ['rel-night-ferries', 'rel-tideline', 'rel-signal-hill'];
export const sharedReleaseIds = ['rel-signal-hill'];

export interface LoadUser {
  email: string;
  role: Role;
}

export const loadUsers: LoadUser[] = [
  { email: 'engineer@brackwater.test', role: 'engineer' },
  { email: 'coordinator@brackwater.test', role: 'coordinator' },
  { email: 'admin@brackwater.test', role: 'admin' },
  { email: 'distributor@northpier.test', role: 'distributor' },
];

export type EndpointName =
  | 'release list'
  | 'release'
  | 'artwork'
  | 'workflow'
  | 'uploads'
  | 'checks'
  | 'history';

interface EndpointDefinition {
  name: EndpointName;
  /** Whose page calls it: the island shows the panel only with this permission. */
  permission: Permission;
  path: (releaseId: string) => string;
  schema: z.ZodType;
  /** A content check beyond the schema; returns a problem or null. */
  check?: (data: unknown, request: PlannedRequest) => string | null;
}

const releasePath = (id: string, rest = '') => `/api/releases/${encodeURIComponent(id)}${rest}`;

/**
 * GET endpoints of the release list page (ReleaseList) and the release page
 * (ReleaseWorkspace and its panels: ArtworkPanel, ProgressPanel, UploadPanel, ChecksPanel,
 * HistoryPanel), with the permission that makes each panel appear.
 */
export const endpoints: EndpointDefinition[] = [
  {
    name: 'release list',
    permission: 'release:list',
    path: () => '/api/releases',
    schema: releaseListSchema,
    check: (data, request) => {
      const ids = new Set((data as z.infer<typeof releaseListSchema>).releases.map((r) => r.id));
      const missing = request.visibleReleaseIds.filter((id) => !ids.has(id));
      const leaked = request.hiddenReleaseIds.filter((id) => ids.has(id));
      if (missing.length) return `the list lacks ${missing.join(', ')}`;
      if (leaked.length) return `the list shows ${leaked.join(', ')}, which this user may not see`;
      return null;
    },
  },
  {
    name: 'release',
    permission: 'release:read',
    path: (id) => releasePath(id),
    schema: releaseDetailSchema,
    check: (data, request) => {
      const release = data as z.infer<typeof releaseDetailSchema>;
      return release.id === request.releaseId ? null : `answered release ${release.id}`;
    },
  },
  {
    name: 'artwork',
    permission: 'release:read',
    path: (id) => releasePath(id, '/artwork'),
    schema: artworkResponseSchema,
  },
  {
    name: 'workflow',
    permission: 'finding:read',
    path: (id) => releasePath(id, '/workflow'),
    schema: workflowStatusSchema,
  },
  {
    name: 'uploads',
    permission: 'audio:upload',
    path: (id) => releasePath(id, '/uploads'),
    schema: uploadStatusSchema,
  },
  {
    name: 'checks',
    permission: 'finding:read',
    path: (id) => releasePath(id, '/checks'),
    schema: checkReportSchema,
  },
  {
    name: 'history',
    permission: 'audit:read',
    path: (id) => releasePath(id, '/history'),
    schema: auditResponseSchema,
  },
];

export interface PlannedRequest {
  user: string;
  role: Role;
  endpoint: EndpointName;
  /** Empty for the release list. */
  releaseId: string;
  path: string;
  /** Releases this user's list must show (other tests' fixtures may be there too)… */
  visibleReleaseIds: string[];
  /** …and the label's releases it must not show (the distributor's unshared ones). */
  hiddenReleaseIds: string[];
}

/**
 * Each user's requests, interleaved user by user so that any stretch of the sequence mixes
 * the roles (autocannon walks the list in order on every connection).
 */
export function planRequests(options: {
  users?: LoadUser[];
  labelReleases?: string[];
  sharedReleases?: string[];
}): PlannedRequest[] {
  const users = options.users ?? loadUsers;
  const labelReleases = options.labelReleases ?? labelReleaseIds;
  const sharedReleases = options.sharedReleases ?? sharedReleaseIds;
  const perUser = users.map((user) => {
    const visible = user.role === 'distributor' ? sharedReleases : labelReleases;
    const hidden = labelReleases.filter((id) => !visible.includes(id));
    const list: PlannedRequest[] = [];
    for (const endpoint of endpoints) {
      if (!can(user.role, endpoint.permission)) continue;
      const releaseIds = endpoint.name === 'release list' ? [''] : visible;
      for (const releaseId of releaseIds) {
        list.push({
          user: user.email,
          role: user.role,
          endpoint: endpoint.name,
          releaseId,
          path: endpoint.path(releaseId),
          visibleReleaseIds: visible,
          hiddenReleaseIds: hidden,
        });
      }
    }
    return list;
  });
  const plan: PlannedRequest[] = [];
  const longest = Math.max(0, ...perUser.map((l) => l.length));
  for (let i = 0; i < longest; i++) {
    for (const list of perUser) {
      const request = list[i];
      if (request) plan.push(request);
    }
  }
  return plan;
}

/** Checks one answer body against the endpoint's schema and content check; null when fine. */
export function validateAnswer(request: PlannedRequest, body: string): string | null {
  const endpoint = endpoints.find((e) => e.name === request.endpoint);
  if (!endpoint) return `unknown endpoint ${request.endpoint}`;
  let data: unknown;
  try {
    data = JSON.parse(body);
  } catch {
    return `not JSON: ${body.slice(0, 80)}`;
  }
  const parsed = endpoint.schema.safeParse(data);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    return `does not match the schema at ${issue?.path.join('.') || '(root)'}: ${issue?.message}`;
  }
  return endpoint.check?.(parsed.data, request) ?? null;
}

/** `GET /api/releases/x/checks as engineer@…`, for messages. */
export function describeRequest(request: PlannedRequest): string {
  return `GET ${request.path} as ${request.user}`;
}

export interface LatencySummary {
  count: number;
  meanMs: number;
  p50Ms: number;
  p95Ms: number;
  p99Ms: number;
  maxMs: number;
}

/** Nearest-rank percentiles of `values` (sorted in place). */
export function summarizeLatency(values: number[]): LatencySummary {
  values.sort((a, b) => a - b);
  const n = values.length;
  const rank = (p: number) => (n ? (values[Math.max(0, Math.ceil((p / 100) * n) - 1)] ?? 0) : 0);
  const sum = values.reduce((a, b) => a + b, 0);
  return {
    count: n,
    meanMs: n ? sum / n : 0,
    p50Ms: rank(50),
    p95Ms: rank(95),
    p99Ms: rank(99),
    maxMs: n ? (values[n - 1] ?? 0) : 0,
  };
}
