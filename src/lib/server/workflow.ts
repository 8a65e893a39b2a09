import { randomUUID } from 'node:crypto';
import { and, desc, eq, inArray, isNull } from 'drizzle-orm';
import type { WorkflowStatus } from '../api/workflow-schemas';
import { can, type Role } from '../auth/permissions';
import type { Database } from '../db/client';
import { member, packages, releaseShares, releases, signoffs, user, waivers } from '../db/schema';
import { enqueueMail, flushOutbox } from '../mail/outbox';
import { renderReadyForApprovalMail, renderReturnedMail } from '../mail/templates';
import type { Finding } from '../specs/types';
import {
  activeWaivers,
  findApprovalBlockers,
  isApprovable,
  measuredFingerprint,
  type Waiver,
  waiverPermissionFor,
} from '../workflow/approval';
import {
  checkTransition,
  isEditable,
  type ReleaseState,
  type WorkflowAction,
} from '../workflow/transitions';
import { recordAudit } from './audit';
import { latestCheckReport, loadCheckInputs } from './checks';
import { getEnv } from './env';
import { ApiError } from './errors';
import { startPackageBuild } from './packaging';
import type { Actor } from './route';

async function loadRelease(db: Database, actor: Actor, releaseId: string) {
  const [release] = await db
    .select()
    .from(releases)
    .where(and(eq(releases.id, releaseId), eq(releases.organizationId, actor.organizationId)))
    .limit(1);
  if (!release) throw new ApiError('not_found', 'No release with that id is visible to you.');
  return release;
}

function releaseUrl(releaseId: string): string {
  return new URL(`/releases/${releaseId}`, getEnv().BETTER_AUTH_URL).toString();
}

async function loadWaivers(db: Database, releaseId: string): Promise<(Waiver & { id: string })[]> {
  const rows = await db
    .select({ waiver: waivers, by: user.name })
    .from(waivers)
    .leftJoin(user, eq(user.id, waivers.waivedBy))
    .where(and(eq(waivers.releaseId, releaseId), isNull(waivers.revokedAt)))
    .orderBy(desc(waivers.createdAt));
  return rows.map((r) => ({
    id: r.waiver.id,
    findingKey: r.waiver.findingKey,
    waivedMeasured: r.waiver.waivedMeasured,
    reason: r.waiver.reason,
    waivedBy: r.by ?? 'unknown',
    waivedAt: r.waiver.createdAt.toISOString(),
  }));
}

async function latestSignoff(db: Database, releaseId: string, kind: 'audio' | 'metadata') {
  const [row] = await db
    .select({ signoff: signoffs, by: user.name })
    .from(signoffs)
    .leftJoin(user, eq(user.id, signoffs.signedBy))
    .where(and(eq(signoffs.releaseId, releaseId), eq(signoffs.kind, kind)))
    .orderBy(desc(signoffs.createdAt))
    .limit(1);
  return row ?? null;
}

/** Everything the release's progress panel shows, for the actor's role. */
export async function getWorkflowStatus(
  db: Database,
  actor: Actor,
  releaseId: string,
): Promise<WorkflowStatus> {
  const release = await loadRelease(db, actor, releaseId);
  const inputs = await loadCheckInputs(db, actor.organizationId, releaseId);
  const report = await latestCheckReport(db, actor, releaseId, inputs);
  const waiverList = await loadWaivers(db, releaseId);
  const audio = await latestSignoff(db, releaseId, 'audio');
  const metadata = await latestSignoff(db, releaseId, 'metadata');
  const audioCurrent = audio?.signoff.fingerprint === inputs.audioFingerprint;
  const metadataCurrent = metadata?.signoff.fingerprint === inputs.metadataFingerprint;
  const findings = report.findings as Finding[];
  const blockers = findApprovalBlockers({
    findings,
    waivers: waiverList,
    checksRun: report.run !== null,
    checksStale: report.stale,
    audioSignedOff: audioCurrent,
    metadataSignedOff: metadataCurrent,
  });
  const activeKeys = new Set(activeWaivers(findings, waiverList).keys());
  const packageRows = await db
    .select()
    .from(packages)
    .where(eq(packages.releaseId, releaseId))
    .orderBy(desc(packages.version));
  const shareRows = await db
    .select({
      userId: user.id,
      name: user.name,
      email: user.email,
      sharedAt: releaseShares.createdAt,
    })
    .from(releaseShares)
    .innerJoin(user, eq(user.id, releaseShares.userId))
    .where(eq(releaseShares.releaseId, releaseId));
  const distributors = await db
    .select({ userId: user.id, name: user.name, email: user.email })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.organizationId, actor.organizationId), eq(member.role, 'distributor')));
  const state = release.state as ReleaseState;
  const panelActions = [
    'submit_for_review',
    'sign_off_audio',
    'sign_off_metadata',
    'approve',
    'reopen',
  ] as const;
  const actions = panelActions.filter((a) => checkTransition(state, a, actor.role).ok);
  return {
    state,
    version: release.version,
    signoffs: {
      audio: audio
        ? {
            by: audio.by ?? 'unknown',
            at: audio.signoff.createdAt.toISOString(),
            current: audioCurrent,
          }
        : null,
      metadata: metadata
        ? {
            by: metadata.by ?? 'unknown',
            at: metadata.signoff.createdAt.toISOString(),
            current: metadataCurrent,
          }
        : null,
    },
    checks: {
      run: report.run !== null,
      stale: report.stale,
      failures: report.summary.failures,
      warnings: report.summary.warnings,
    },
    waivers: waiverList.map((w) => ({ ...w, active: activeKeys.has(w.findingKey) })),
    blockers: {
      failures: blockers.failures.length,
      unwaivedWarnings: blockers.unwaivedWarnings.map((f) => ({
        key: f.key,
        ruleId: f.ruleId,
        trackId: f.trackId,
        message: f.message,
      })),
      missing: blockers.missing,
    },
    approvable: isApprovable(blockers),
    packages: packageRows.map((p) => ({
      id: p.id,
      version: p.version,
      state: p.state,
      sizeBytes: p.sizeBytes,
      sha256: p.sha256,
      progressFiles: p.progressFiles,
      totalFiles: p.totalFiles,
      error: p.error,
      createdAt: p.createdAt.toISOString(),
      readyAt: p.readyAt?.toISOString() ?? null,
    })),
    shares: shareRows.map((s) => ({ ...s, sharedAt: s.sharedAt.toISOString() })),
    distributors,
    actions,
    canWaive: {
      audio: can(actor.role, 'waiver:audio'),
      metadata: can(actor.role, 'waiver:metadata'),
    },
    canShare:
      can(actor.role, 'release:share') &&
      (state === 'approved' || state === 'packaged' || state === 'delivered'),
  };
}

function assertTransition(state: string, action: WorkflowAction, role: Role) {
  const answer = checkTransition(state as ReleaseState, action, role);
  if (!answer.ok) throw new ApiError(answer.code, answer.reason);
  return answer.to;
}

async function membersWithRoles(db: Database, organizationId: string, roles: Role[]) {
  return db
    .select({ email: user.email })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.organizationId, organizationId), inArray(member.role, roles)));
}

/** Records the engineer's (audio) or coordinator's (metadata) sign-off of what is there now. */
export async function signOff(
  db: Database,
  actor: Actor,
  releaseId: string,
  kind: 'audio' | 'metadata',
) {
  const release = await loadRelease(db, actor, releaseId);
  assertTransition(
    release.state,
    kind === 'audio' ? 'sign_off_audio' : 'sign_off_metadata',
    actor.role,
  );
  const inputs = await loadCheckInputs(db, actor.organizationId, releaseId);
  if (kind === 'audio' && inputs.trackTitles.some((t) => !t.hasAudio)) {
    throw new ApiError(
      'conflict',
      'Every track needs its master file before the audio can be signed off.',
    );
  }
  await db.transaction(async (tx) => {
    await tx.insert(signoffs).values({
      id: randomUUID(),
      releaseId,
      kind,
      fingerprint: kind === 'audio' ? inputs.audioFingerprint : inputs.metadataFingerprint,
      signedBy: actor.userId,
    });
    await recordAudit(tx, {
      organizationId: actor.organizationId,
      releaseId,
      actorId: actor.userId,
      action: `signoff.${kind}`,
    });
  });
  const status = await getWorkflowStatus(db, actor, releaseId);
  if (status.approvable) {
    const coordinators = await membersWithRoles(db, actor.organizationId, ['coordinator']);
    await enqueueMail(
      db,
      actor.organizationId,
      coordinators.map((c) =>
        renderReadyForApprovalMail({
          to: c.email,
          releaseTitle: release.title,
          releaseUrl: releaseUrl(releaseId),
        }),
      ),
    );
    void flushOutbox(db).catch(() => undefined);
  }
  return status;
}

/** Waives a warning with a written reason; failures cannot be waived. */
export async function waiveFinding(
  db: Database,
  actor: Actor,
  releaseId: string,
  input: { findingKey: string; reason: string },
) {
  const release = await loadRelease(db, actor, releaseId);
  if (!isEditable(release.state)) {
    throw new ApiError(
      'conflict',
      'This release is approved and locked; reopen it to change waivers.',
    );
  }
  const report = await latestCheckReport(db, actor, releaseId);
  const finding = report.findings.find((f) => f.key === input.findingKey);
  if (!finding)
    throw new ApiError(
      'not_found',
      'That finding is not in the latest check run; run the checks again.',
    );
  if (finding.severity !== 'warning') {
    throw new ApiError(
      'conflict',
      finding.severity === 'failure'
        ? 'A failure cannot be waived: fix the file or the metadata.'
        : 'This check passes; there is nothing to waive.',
    );
  }
  const permission = waiverPermissionFor(finding.ruleId);
  if (!can(actor.role, permission)) {
    throw new ApiError(
      'forbidden',
      permission === 'waiver:audio'
        ? 'Warnings about the audio are waived by the engineer.'
        : 'Warnings about the metadata are waived by the coordinator.',
    );
  }
  const id = randomUUID();
  await db.insert(waivers).values({
    id,
    releaseId,
    findingKey: finding.key,
    waivedMeasured: measuredFingerprint(finding),
    reason: input.reason,
    waivedBy: actor.userId,
  });
  await recordAudit(db, {
    organizationId: actor.organizationId,
    releaseId,
    actorId: actor.userId,
    action: 'waiver.added',
    after: {
      findingKey: finding.key,
      measured: finding.measured,
      limit: finding.limit,
      reason: input.reason,
    },
  });
  return getWorkflowStatus(db, actor, releaseId);
}

/** Withdraws a waiver (undo). */
export async function revokeWaiver(
  db: Database,
  actor: Actor,
  releaseId: string,
  waiverId: string,
) {
  const release = await loadRelease(db, actor, releaseId);
  if (!isEditable(release.state)) {
    throw new ApiError(
      'conflict',
      'This release is approved and locked; reopen it to change waivers.',
    );
  }
  const [row] = await db
    .update(waivers)
    .set({ revokedAt: new Date() })
    .where(
      and(eq(waivers.id, waiverId), eq(waivers.releaseId, releaseId), isNull(waivers.revokedAt)),
    )
    .returning();
  if (!row) throw new ApiError('not_found', 'No such waiver on this release.');
  await recordAudit(db, {
    organizationId: actor.organizationId,
    releaseId,
    actorId: actor.userId,
    action: 'waiver.revoked',
    before: { findingKey: row.findingKey, reason: row.reason },
  });
  return getWorkflowStatus(db, actor, releaseId);
}

/** Moves the release to another state with optimistic locking on its version. */
async function moveState(
  db: Database,
  actor: Actor,
  release: typeof releases.$inferSelect,
  to: ReleaseState,
  expectedVersion: number,
  audit: { action: string; after?: unknown },
) {
  // The state change and its audit event are written together or not at all.
  return db.transaction(async (tx) => {
    const [moved] = await tx
      .update(releases)
      .set({ state: to, version: release.version + 1, updatedAt: new Date() })
      .where(and(eq(releases.id, release.id), eq(releases.version, expectedVersion)))
      .returning();
    if (!moved) {
      throw new ApiError(
        'conflict',
        'Someone else changed this release since you opened it. Reload and try again.',
      );
    }
    await recordAudit(tx, {
      organizationId: release.organizationId,
      releaseId: release.id,
      actorId: actor.userId,
      action: audit.action,
      before: { state: release.state },
      after: { state: to, ...(audit.after as object | undefined) },
    });
    return moved;
  });
}

export async function submitForReview(
  db: Database,
  actor: Actor,
  releaseId: string,
  version: number,
) {
  const release = await loadRelease(db, actor, releaseId);
  const to = assertTransition(release.state, 'submit_for_review', actor.role);
  if (to) await moveState(db, actor, release, to, version, { action: 'release.submitted' });
  return getWorkflowStatus(db, actor, releaseId);
}

/** Approves (every blocker cleared), locks the release and starts building its package. */
export async function approveRelease(
  db: Database,
  actor: Actor,
  releaseId: string,
  version: number,
) {
  const release = await loadRelease(db, actor, releaseId);
  const to = assertTransition(release.state, 'approve', actor.role);
  const status = await getWorkflowStatus(db, actor, releaseId);
  if (!status.approvable) {
    const reasons = [
      ...(status.blockers.failures ? [`${status.blockers.failures} failure(s) are open.`] : []),
      ...(status.blockers.unwaivedWarnings.length
        ? [`${status.blockers.unwaivedWarnings.length} warning(s) are neither resolved nor waived.`]
        : []),
      ...status.blockers.missing,
    ];
    throw new ApiError(
      'conflict',
      `Not ready to approve: ${reasons.join(' ')}`,
      reasons.map((message) => ({ path: 'approval', message })),
    );
  }
  if (to) await moveState(db, actor, release, to, version, { action: 'release.approved' });
  const pkg = await startPackageBuild(db, {
    releaseId,
    organizationId: actor.organizationId,
    createdBy: actor.userId,
  });
  await recordAudit(db, {
    organizationId: actor.organizationId,
    releaseId,
    actorId: actor.userId,
    action: 'package.started',
    after: { version: pkg.version },
  });
  return getWorkflowStatus(db, actor, releaseId);
}

/** Reopens an approved release for changes; the next approval makes a new package version. */
export async function reopenRelease(
  db: Database,
  actor: Actor,
  releaseId: string,
  version: number,
  reason: string,
) {
  const release = await loadRelease(db, actor, releaseId);
  const to = assertTransition(release.state, 'reopen', actor.role);
  if (to)
    await moveState(db, actor, release, to, version, {
      action: 'release.reopened',
      after: { reason },
    });
  return getWorkflowStatus(db, actor, releaseId);
}

/** Shares an approved release with a distributor member of the label. */
export async function shareRelease(
  db: Database,
  actor: Actor,
  releaseId: string,
  distributorUserId: string,
) {
  const release = await loadRelease(db, actor, releaseId);
  if (!['approved', 'packaged', 'delivered'].includes(release.state)) {
    throw new ApiError('conflict', 'Only an approved release can be shared with a distributor.');
  }
  const [distributor] = await db
    .select({ userId: user.id, name: user.name })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(
      and(
        eq(member.organizationId, actor.organizationId),
        eq(member.userId, distributorUserId),
        eq(member.role, 'distributor'),
      ),
    )
    .limit(1);
  if (!distributor)
    throw new ApiError('invalid_request', 'That person is not a distributor of this label.');
  const [latest] = await db
    .select({ version: packages.version, state: packages.state })
    .from(packages)
    .where(eq(packages.releaseId, releaseId))
    .orderBy(desc(packages.version))
    .limit(1);
  const inserted = await db
    .insert(releaseShares)
    .values({
      releaseId,
      userId: distributorUserId,
      sharedBy: actor.userId,
      fromPackageVersion: latest?.version ?? 1,
    })
    .onConflictDoNothing()
    .returning();
  if (inserted.length > 0) {
    await recordAudit(db, {
      organizationId: actor.organizationId,
      releaseId,
      actorId: actor.userId,
      action: 'release.shared',
      after: { distributor: distributor.name },
    });
    if (latest?.state === 'ready') {
      const { notifyDistributors } = await import('./packaging');
      await notifyDistributors(db, actor.organizationId, releaseId, latest.version, [
        distributorUserId,
      ]);
    }
  }
  return getWorkflowStatus(db, actor, releaseId);
}

/** The distributor confirms ingestion, or returns the release with a reason. */
export async function answerDelivery(
  db: Database,
  actor: Actor,
  releaseId: string,
  answer: { kind: 'acknowledge' } | { kind: 'return'; reason: string },
) {
  const [release] = await db
    .select()
    .from(releases)
    .innerJoin(releaseShares, eq(releaseShares.releaseId, releases.id))
    .where(
      and(
        eq(releases.id, releaseId),
        eq(releases.organizationId, actor.organizationId),
        actor.role === 'admin' ? undefined : eq(releaseShares.userId, actor.userId),
      ),
    )
    .limit(1);
  if (!release)
    throw new ApiError('not_found', 'No release with that id has been shared with you.');
  const row = release.releases;
  const to = assertTransition(row.state, answer.kind, actor.role);
  if (!to) return;
  await moveState(db, actor, row, to, row.version, {
    action: answer.kind === 'acknowledge' ? 'delivery.acknowledged' : 'delivery.returned',
    after: answer.kind === 'return' ? { reason: answer.reason } : undefined,
  });
  if (answer.kind === 'return') {
    const label = await membersWithRoles(db, actor.organizationId, ['coordinator', 'admin']);
    await enqueueMail(
      db,
      actor.organizationId,
      label.map((m) =>
        renderReturnedMail({
          to: m.email,
          releaseTitle: row.title,
          distributorName: actor.userName,
          reason: answer.reason,
          releaseUrl: releaseUrl(releaseId),
        }),
      ),
    );
    void flushOutbox(db).catch(() => undefined);
  }
}
