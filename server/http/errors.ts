import type { ErrorRequestHandler } from "express";
import { ZodError } from "zod";
import multer from "multer";
import { DomainError, type DomainErrorKind } from "../domain/errors";

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string>,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, fields?: Record<string, string>) => new HttpError(400, "bad_request", message, fields);
export const unauthorized = (message = "Sign in to continue.") => new HttpError(401, "unauthorized", message);
export const forbidden = (message = "Your role in this study does not allow this.") => new HttpError(403, "forbidden", message);
export const notFound = (message = "Not found.") => new HttpError(404, "not_found", message);
export const conflict = (message: string, fields?: Record<string, string>) => new HttpError(409, "conflict", message, fields);

/** Turns zod issues into `{ field: message }`, naming nested paths with dots. */
export function zodFields(error: ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join(".") : "_";
    if (!fields[key]) fields[key] = issue.message;
  }
  return fields;
}

export function validationError(error: ZodError, where: string): HttpError {
  const fields = zodFields(error);
  const summary = Object.entries(fields)
    .map(([k, v]) => (k === "_" ? v : `${k}: ${v}`))
    .join("; ");
  return new HttpError(400, "validation_failed", `Invalid ${where}: ${summary}`, fields);
}

const CONNECTION_ERRORS = new Set(["ECONNREFUSED", "ECONNRESET", "57P01", "57P03", "08006", "08001", "08003"]);

/** Drizzle wraps driver errors (DrizzleQueryError.cause), so the whole cause chain is checked. */
function isDatabaseDown(err: unknown): boolean {
  for (let e = err as { code?: string; message?: string; cause?: unknown } | null, depth = 0; e && depth < 5; depth++) {
    if (e.code && CONNECTION_ERRORS.has(e.code)) return true;
    if (/timeout exceeded when trying to connect|Connection terminated|the database system is (shutting down|starting up)/i.test(e.message ?? "")) return true;
    e = e.cause as typeof e;
  }
  return false;
}

/** PostgreSQL's refusals of a NUL character: 22P05 in JSON (\u0000), 22021 in text. */
const NUL_REFUSALS = new Set(["22P05", "22021"]);

function isNulRefusal(err: unknown): boolean {
  for (let e = err as { code?: string; message?: string; detail?: string; cause?: unknown } | null, depth = 0; e && depth < 5; depth++) {
    if (e.code && NUL_REFUSALS.has(e.code) && /\\u0000|0x00/.test(`${e.message ?? ""} ${e.detail ?? ""}`)) return true;
    e = e.cause as typeof e;
  }
  return false;
}

/**
 * A body that cannot be read as sent is the client's fault, never a 500: an unknown
 * Content-Encoding or charset (415), data that does not match its Content-Encoding (zlib refuses
 * it, 400), or a multipart body that breaks off or is malformed (multer passes busboy's error on
 * after removing what it stored, marked by `storageErrors`).
 */
function unreadableBody(err: unknown): { status: number; code: string; message: string } | null {
  const e = err as { type?: string; status?: number; code?: unknown; message?: string; storageErrors?: unknown; encoding?: string; charset?: string };
  if (e.type === "encoding.unsupported") {
    return { status: 415, code: "unsupported_content_encoding", message: `The request body's Content-Encoding${e.encoding ? ` "${e.encoding}"` : ""} is not supported: send it uncompressed, or compressed with gzip, deflate or br.` };
  }
  if (e.type === "charset.unsupported") {
    return { status: 415, code: "unsupported_charset", message: `The request body's charset${e.charset ? ` "${e.charset}"` : ""} is not supported: send JSON as UTF-8.` };
  }
  if (e.status === 400 && typeof e.code === "string" && e.code.startsWith("Z_")) {
    return { status: 400, code: "bad_content_encoding", message: "The request body does not match its Content-Encoding: it could not be decompressed." };
  }
  if (Array.isArray(e.storageErrors) && !(err instanceof multer.MulterError)) {
    return { status: 400, code: "unreadable_upload", message: `The uploaded form could not be read (${e.message ?? "malformed"}); send the file again as multipart/form-data.` };
  }
  // Any other refusal of the body parser (http-errors marks those safe to show with `expose`).
  const exposed = (err as { expose?: boolean }).expose === true;
  if (exposed && typeof e.status === "number" && e.status >= 400 && e.status < 500) {
    return { status: e.status, code: typeof e.type === "string" ? e.type.replace(/\W+/g, "_") : "unreadable_body", message: `The request body could not be read: ${e.message ?? "malformed"}.` };
  }
  return null;
}

/** The one place a domain refusal becomes an HTTP status. */
export const STATUS_OF_DOMAIN_ERROR: Record<DomainErrorKind, number> = {
  invalid: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  unsupported_media: 415,
  unavailable: 503,
};

export const errorHandler: ErrorRequestHandler = (err, _req, res, _next) => {
  void _next;
  if (err instanceof DomainError) {
    // Details (an import's row problems, the value that won a conflict) sit beside `error`.
    res.status(STATUS_OF_DOMAIN_ERROR[err.kind]).json({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) }, ...err.details });
    return;
  }
  if (err instanceof HttpError) {
    if (err.headers) res.set(err.headers);
    res.status(err.status).json({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } });
    return;
  }
  if (err instanceof multer.MulterError) {
    const status = err.code === "LIMIT_FILE_SIZE" ? 413 : 400;
    const message =
      err.code === "LIMIT_FILE_SIZE"
        ? "The file is larger than the upload limit."
        : err.code === "LIMIT_UNEXPECTED_FILE" || err.code === "LIMIT_FILE_COUNT"
          ? `Attach exactly one file, as the form field "file"${err.field && err.field !== "file" ? ` (a file came as "${err.field}")` : ""}.`
          : err.message;
    res.status(status).json({ error: { code: err.code.toLowerCase(), message } });
    return;
  }
  if ((err as { type?: string }).type === "entity.parse.failed") {
    res.status(400).json({ error: { code: "invalid_json", message: "The request body is not valid JSON." } });
    return;
  }
  if ((err as { type?: string }).type === "entity.too.large") {
    res.status(413).json({ error: { code: "too_large", message: "The request body is too large." } });
    return;
  }
  const unreadable = unreadableBody(err);
  if (unreadable) {
    res.status(unreadable.status).json({ error: { code: unreadable.code, message: unreadable.message } });
    return;
  }
  if (isNulRefusal(err)) {
    // The statement was refused as a whole, inside its transaction: nothing of it was written.
    res.status(400).json({ error: { code: "nul_character", message: "The text holds a NUL character (U+0000), which cannot be stored. Remove it and try again." } });
    return;
  }
  if (isDatabaseDown(err)) {
    res.set("Retry-After", "5");
    res.status(503).json({ error: { code: "database_unavailable", message: "The database is not reachable right now. Try again in a few seconds." } });
    return;
  }
  console.error(err);
  res.status(500).json({ error: { code: "internal", message: "Something went wrong on the server. The error was logged." } });
};
