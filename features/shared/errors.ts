// Typed error codes of the API's error envelope (docs/api.md) and the statuses they map to.
export const errorStatus = {
  bad_request: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  method_not_allowed: 405,
  conflict: 409,
  too_large: 413,
  unsupported_type: 415,
  invalid: 422,
  rate_limited: 429,
  internal: 500,
} as const;

export type ErrorCode = keyof typeof errorStatus;

export interface FieldIssue {
  path: string;
  message: string;
}

export interface ErrorBody {
  error: { code: ErrorCode; message: string; issues?: FieldIssue[] };
}

/** An expected failure that becomes an API error envelope. */
export class AppError extends Error {
  readonly code: ErrorCode;
  readonly issues?: FieldIssue[];
  constructor(code: ErrorCode, message: string, issues?: FieldIssue[], options?: { cause?: unknown }) {
    super(message, options);
    this.name = "AppError";
    this.code = code;
    this.issues = issues;
  }
  get status(): number {
    return errorStatus[this.code];
  }
  toBody(): ErrorBody {
    return { error: { code: this.code, message: this.message, ...(this.issues ? { issues: this.issues } : {}) } };
  }
}

export const unauthenticated = () => new AppError("unauthenticated", "Sign in to do this.");
export const forbidden = (what = "do this") => new AppError("forbidden", `Your role does not allow you to ${what}.`);
export const notFound = (what = "That page") => new AppError("not_found", `${what} was not found.`);
