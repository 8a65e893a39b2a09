import { and, eq } from 'drizzle-orm';
import { getDb } from '@/lib/db/client';
import { packages, releases } from '@/lib/db/schema';
import { ApiError } from '@/lib/server/errors';
import { retryPackageBuild } from '@/lib/server/packaging';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow } from '@/lib/server/route';

/** Builds a failed package again. */
export const POST = defineRoute('release:approve', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'package address');
  const db = getDb();
  const [row] = await db
    .select({ id: packages.id })
    .from(packages)
    .innerJoin(releases, eq(releases.id, packages.releaseId))
    .where(and(eq(packages.id, id), eq(releases.organizationId, actor.organizationId)));
  if (!row) throw new ApiError('not_found', 'No such package.');
  try {
    await retryPackageBuild(db, id, actor.organizationId);
  } catch (error) {
    throw new ApiError(
      'conflict',
      error instanceof Error ? error.message : 'The package cannot be rebuilt.',
    );
  }
  return new Response(null, { status: 202 });
});
