import { z } from 'zod';
import { ApiError } from '@/lib/server/errors';
import { definePublicRoute } from '@/lib/server/route';

export const sentMailSchema = z.object({
  messages: z.array(
    z.object({
      id: z.string(),
      receivedAt: z.string(),
      from: z.string(),
      to: z.array(z.string()),
      subject: z.string(),
      text: z.string(),
    }),
  ),
});

// Public by design, and only while our local mail fake is running (MAIL_FAKE_URL): an
// invited person has no account yet, and in development the fake mailbox is how they get
// the link. With a real SMTP server this route answers 404.
export const GET = definePublicRoute(async () => {
  const base = process.env.MAIL_FAKE_URL;
  if (!base)
    throw new ApiError('not_found', 'The sent-mail view exists only with the local mail fake.');
  const answer = await fetch(new URL('/messages', base)).catch(() => null);
  if (!answer?.ok) throw new ApiError('internal', 'The local mail fake did not answer.');
  const parsed = sentMailSchema.parse(await answer.json());
  return Response.json(parsed);
});
