/** Browser-side fetch helpers: parse every answer with the shared zod schema. */
import type { z } from 'zod';
import { apiErrorSchema } from '@/lib/api/schemas';

export class ApiRequestError extends Error {
  readonly status: number;
  readonly code: string;
  readonly issues: { path: string; message: string }[];

  constructor(
    status: number,
    code: string,
    message: string,
    issues: { path: string; message: string }[] = [],
  ) {
    super(message);
    this.status = status;
    this.code = code;
    this.issues = issues;
  }
}

async function toError(response: Response): Promise<ApiRequestError> {
  const body: unknown = await response.json().catch(() => null);
  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    const { code, message, issues } = parsed.data.error;
    return new ApiRequestError(response.status, code, message, issues);
  }
  return new ApiRequestError(
    response.status,
    'http_error',
    `The server answered ${response.status}.`,
  );
}

/** GETs `url` and parses the JSON answer with `schema`. */
export async function getJson<T extends z.ZodType>(url: string, schema: T): Promise<z.infer<T>> {
  const response = await fetch(url, { headers: { accept: 'application/json' } });
  if (!response.ok) throw await toError(response);
  return schema.parse(await response.json());
}

/** Sends JSON with `method` and parses the answer with `schema`. */
export async function sendJson<T extends z.ZodType>(
  method: 'POST' | 'PUT' | 'PATCH' | 'DELETE',
  url: string,
  body: unknown,
  schema: T,
): Promise<z.infer<T>> {
  const response = await fetch(url, {
    method,
    headers: { 'content-type': 'application/json', accept: 'application/json' },
    body: JSON.stringify(body),
  });
  if (!response.ok) throw await toError(response);
  return schema.parse(await response.json());
}
