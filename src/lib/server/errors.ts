/** Every error the API returns, by code, with its HTTP status. One table, used everywhere. */
export const errorStatus = {
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  invalid_request: 400,
  conflict: 409,
  payload_too_large: 413,
  unsupported_media_type: 415,
  internal: 500,
  /** A service the server depends on (object storage) could not be reached; try again. */
  unavailable: 503,
} as const;

export type ErrorCode = keyof typeof errorStatus;

export interface ErrorIssue {
  path: string;
  message: string;
}

/** An error that becomes `{ error: { code, message, issues? } }` with its status. */
export class ApiError extends Error {
  readonly code: ErrorCode;
  readonly issues?: ErrorIssue[];

  constructor(code: ErrorCode, message: string, issues?: ErrorIssue[]) {
    super(message);
    this.name = 'ApiError';
    this.code = code;
    this.issues = issues;
  }

  get status(): number {
    return errorStatus[this.code];
  }

  toResponse(): Response {
    const body = { error: { code: this.code, message: this.message, issues: this.issues } };
    return Response.json(body, { status: this.status });
  }
}
