import { z } from 'zod';

/**
 * Server configuration, read from the environment once and validated. `npm start` and the
 * test harness fill in defaults (absolute paths, a generated secret); the server itself
 * assumes nothing about the current directory.
 */
const envSchema = z.object({
  DATABASE_URL: z
    .string({ error: 'DATABASE_URL is required (file:/abs/path.db or libsql://…)' })
    .regex(
      /^(file:|libsql:|https?:|wss?:)/,
      'DATABASE_URL must start with file:, libsql:, http(s): or ws(s):',
    ),
  DATABASE_AUTH_TOKEN: z.string().optional(),
  BETTER_AUTH_SECRET: z
    .string({ error: 'BETTER_AUTH_SECRET is required (32+ random characters)' })
    .min(32, 'BETTER_AUTH_SECRET must be at least 32 characters'),
  BETTER_AUTH_URL: z.url({
    error: 'BETTER_AUTH_URL must be the public URL, e.g. http://localhost:4321',
  }),
  S3_ENDPOINT: z.url({ error: 'S3_ENDPOINT must be a URL, e.g. http://127.0.0.1:4569' }),
  S3_REGION: z.string().default('us-east-1'),
  S3_BUCKET: z.string().min(3).default('quayside'),
  S3_ACCESS_KEY_ID: z.string().default('S3RVER'),
  S3_SECRET_ACCESS_KEY: z.string().default('S3RVER'),
  SMTP_URL: z.string().regex(/^smtps?:\/\//, 'SMTP_URL must look like smtp://host:port'),
  MAIL_FROM: z.string().default('Quayside <no-reply@quayside.test>'),
  /**
   * Largest master upload accepted, bytes. The default, 5 GiB, leaves room for a 4 GiB RF64
   * master (24-bit/96 kHz stereo, about 2 h) plus its header and tag chunks.
   */
  QUAYSIDE_MAX_UPLOAD_BYTES: z.coerce
    .number({ error: 'QUAYSIDE_MAX_UPLOAD_BYTES must be a number of bytes' })
    .int()
    .positive()
    .default(5 * 1024 ** 3),
  /** How often queued e-mail that could not be sent is tried again, milliseconds. */
  QUAYSIDE_MAIL_RETRY_MS: z.coerce
    .number({ error: 'QUAYSIDE_MAIL_RETRY_MS must be a number of milliseconds' })
    .int()
    .min(100)
    .default(15_000),
  /**
   * `off` turns the in-memory read caches off (resolved sessions and the release pages' GET
   * answers, see read-cache.ts): every request then reads the database. For comparisons.
   */
  QUAYSIDE_READ_CACHE: z.enum(['on', 'off']).default('on'),
  /** HTTP address of our local mail fake; when set, the sent-mail page reads from it. */
  MAIL_FAKE_URL: z.url().optional(),
});

export type ServerEnv = z.infer<typeof envSchema>;

let cached: ServerEnv | undefined;

/** The validated environment; throws one readable error listing every problem. */
export function getEnv(): ServerEnv {
  if (cached) return cached;
  const parsed = envSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Quayside cannot start: the environment is not valid\n${lines.join('\n')}`);
  }
  cached = parsed.data;
  return cached;
}
