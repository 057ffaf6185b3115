/**
 * Named error codes, each with the one HTTP status it maps to. Features add theirs here.
 * API errors are JSON: { "error": { "code", "message", "fields"? } }.
 */
export const ERROR_STATUS = {
  BAD_INPUT: 400,
  BAD_JSON: 400,
  BAD_SIGNATURE: 400,
  UNAUTHENTICATED: 401,
  FORBIDDEN: 403,
  NO_COMPANY: 403,
  ORIGIN_REFUSED: 403,
  NOT_FOUND: 404,
  CONFLICT: 409,
  /** A webhook event that depends on one not yet received: the sender retries. */
  EVENT_NOT_READY: 409,
  DUPLICATE_JOB_CODE: 409,
  DUPLICATE_EMAIL: 409,
  ALREADY_MEMBER: 409,
  INVOICE_NOT_DRAFT: 409,
  PAYLOAD_TOO_LARGE: 413,
  UNSUPPORTED_MEDIA_TYPE: 415,
  RULE_BROKEN: 422,
  LAST_OWNER: 422,
  OVER_CONTRACT: 422,
  DEPOSIT_OVER_CAP: 422,
  OVERPAYMENT: 422,
  PAYMENT_PROVIDER: 502,
  /** The card processor made a refund that could not be saved yet; its webhook records it. */
  REFUND_UNRECORDED: 503,
  LOCATE_REQUIRED: 422,
  RATE_LIMITED: 429,
  DB_DOWN: 503,
  INTERNAL: 500,
} as const;

export type ErrorCode = keyof typeof ERROR_STATUS;
export type FieldErrors = Record<string, string>;

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly fields?: FieldErrors;
  constructor(code: ErrorCode, message: string, fields?: FieldErrors) {
    super(message);
    this.code = code;
    this.fields = fields;
  }
  get status(): number {
    return ERROR_STATUS[this.code];
  }
}

export const notFound = (what = 'That record') => new AppError('NOT_FOUND', `${what} was not found.`);

/** zod issues → { "field.path": "first message" }, the shape forms show next to fields. */
export function fieldErrors(issues: readonly { path: readonly PropertyKey[]; message: string }[]): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of issues) {
    const key = issue.path.map(String).join('.') || '_';
    out[key] ??= issue.message;
  }
  return out;
}
