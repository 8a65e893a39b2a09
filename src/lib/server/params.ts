import { z } from 'zod';

/** `[id]` route parameters: an opaque id of bounded length. */
export const releaseParams = z.object({ id: z.string().min(1).max(64) });
