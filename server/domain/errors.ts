// What went wrong, said in the domain's terms. Services throw these and never choose an HTTP
// status: the HTTP layer (server/http/errors.ts, `errorHandler`) maps each kind to one, so a
// service can be called from a job, a script or a test without knowing about requests.

/** The kinds of refusal a service can raise; `server/http/errors.ts` owns their statuses. */
export type DomainErrorKind =
  | "invalid" // the input cannot be used as sent
  | "unauthenticated" // the caller's credentials are wrong
  | "forbidden" // the caller may not do this
  | "not_found"
  | "conflict" // the input is fine but the current state refuses it
  | "too_large"
  | "unsupported_media"
  | "unavailable"; // a dependency (the job queue, a file) cannot serve now

export class DomainError extends Error {
  constructor(
    readonly kind: DomainErrorKind,
    readonly code: string,
    message: string,
    /** Per-field messages, shown beside the form field they name. */
    readonly fields?: Record<string, string>,
    /** More than a message: e.g. every problem of an import by row and column, or the value that won. */
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = "DomainError";
  }
}

export const invalidInput = (message: string, fields?: Record<string, string>) => new DomainError("invalid", "bad_request", message, fields);
/** Fields of the input fail their checks: the same answer as a request that fails its schema. */
export const validationFailed = (message: string, fields: Record<string, string>) => new DomainError("invalid", "validation_failed", message, fields);
export const forbidden = (message = "Your role in this study does not allow this.") => new DomainError("forbidden", "forbidden", message);
export const notFound = (message = "Not found.") => new DomainError("not_found", "not_found", message);
export const conflict = (message: string, fields?: Record<string, string>) => new DomainError("conflict", "conflict", message, fields);

/** A refusal that carries details beside its message (see `DomainError.details`). */
export const detailedError = (kind: DomainErrorKind, code: string, message: string, details: Record<string, unknown>) =>
  new DomainError(kind, code, message, undefined, details);
