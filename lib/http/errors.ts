/**
 * The one error shape of Ebbcast. Every failure that reaches a client is an AppError, sent as
 * `{ "error": { "code", "message", "fields"? } }` with `status` as the HTTP status.
 */
export type ErrorCode =
  | 'bad_request'
  | 'invalid_json'
  | 'validation_failed'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'payload_too_large'
  | 'unsupported_media_type'
  | 'unprocessable'
  | 'rate_limited'
  | 'unavailable'
  | 'internal';

/** Field path (dot-joined zod path, e.g. `params.beta`) → human message. */
export type FieldErrors = Record<string, string>;

export interface ErrorBody {
  error: { code: ErrorCode; message: string; fields?: FieldErrors };
}

const STATUS: Record<ErrorCode, number> = {
  bad_request: 400,
  invalid_json: 400,
  validation_failed: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  payload_too_large: 413,
  unsupported_media_type: 415,
  unprocessable: 422,
  rate_limited: 429,
  unavailable: 503,
  internal: 500,
};

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fields?: FieldErrors;
  /** Extra, non-sensitive detail for the client (e.g. the expected sync seq). */
  readonly detail?: Record<string, unknown>;

  constructor(code: ErrorCode, message: string, opts: { fields?: FieldErrors; detail?: Record<string, unknown> } = {}) {
    super(message);
    this.name = 'AppError';
    this.code = code;
    this.status = STATUS[code];
    this.fields = opts.fields;
    this.detail = opts.detail;
  }

  toBody(): ErrorBody & Record<string, unknown> {
    return {
      error: { code: this.code, message: this.message, ...(this.fields ? { fields: this.fields } : {}), ...(this.detail ?? {}) },
    };
  }
}

export const unauthenticated = () => new AppError('unauthenticated', 'Please sign in to continue.');
export const forbidden = (what = 'this') => new AppError('forbidden', `Your role or team may not access ${what}.`);
export const notFound = (what: string) => new AppError('not_found', `${what} was not found.`);
export const conflict = (message: string, detail?: Record<string, unknown>) => new AppError('conflict', message, { detail });

/** Turns zod issues into `{ 'a.b': message }`, first message per path. Works for zod 4 issues. */
export function fieldsFromIssues(issues: ReadonlyArray<{ path: ReadonlyArray<PropertyKey>; message: string }>): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of issues) {
    const key = issue.path.map(String).join('.') || '(body)';
    if (!(key in fields)) fields[key] = issue.message;
  }
  return fields;
}

export function validationError(
  issues: ReadonlyArray<{ path: ReadonlyArray<PropertyKey>; message: string }>,
  message = 'Some fields are not valid.',
) {
  return new AppError('validation_failed', message, { fields: fieldsFromIssues(issues) });
}
