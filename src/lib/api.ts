// The one way the client talks to the API: JSON in and out, and every failure becomes an
// ApiError carrying the server's `{ error: { code, message, fields? } }`.
import { apiErrorSchema } from "@shared/schemas/common";

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: Record<string, string> = {},
    /** Seconds to wait before trying again, from Retry-After (rate limits, database restarts). */
    readonly retryAfterSeconds: number | null = null,
    /** The whole answer, for refusals that carry more than the error (a 409 with the current value). */
    readonly body: unknown = null,
  ) {
    super(message);
    this.name = "ApiError";
  }

  get isUnauthorized(): boolean {
    return this.status === 401;
  }
}

export const NETWORK_ERROR_CODE = "network";

const FALLBACK_MESSAGES: Record<number, string> = {
  401: "Sign in to continue.",
  403: "Your role in this study does not allow this.",
  404: "This was not found. It may have been deleted.",
  429: "Too many attempts. Wait a little and try again.",
  503: "The server is not available right now. Try again in a few seconds.",
};

type Method = "GET" | "POST" | "PATCH" | "PUT" | "DELETE";

async function request<T>(method: Method, path: string, body?: unknown, signal?: AbortSignal): Promise<T> {
  let response: Response;
  try {
    response = await fetch(`/api${path}`, {
      method,
      credentials: "same-origin",
      headers: body === undefined ? { Accept: "application/json" } : { Accept: "application/json", "Content-Type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
      signal,
    });
  } catch (err) {
    if (signal?.aborted) throw err;
    throw new ApiError(0, NETWORK_ERROR_CODE, "The server could not be reached. Check the connection and try again.");
  }

  if (response.status === 204) return undefined as T;
  const text = await response.text();
  let data: unknown = null;
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = null;
    }
  }
  if (response.ok) return data as T;

  const retryAfter = Number(response.headers.get("Retry-After"));
  const parsed = apiErrorSchema.safeParse(data);
  if (parsed.success) {
    const { code, message, fields } = parsed.data.error;
    throw new ApiError(response.status, code, message, fields, Number.isFinite(retryAfter) && retryAfter > 0 ? retryAfter : null, data);
  }
  throw new ApiError(
    response.status,
    `http_${response.status}`,
    FALLBACK_MESSAGES[response.status] ?? `The server answered with an unexpected error (${response.status}).`,
  );
}

export const api = {
  get: <T>(path: string, signal?: AbortSignal) => request<T>("GET", path, undefined, signal),
  post: <T>(path: string, body?: unknown) => request<T>("POST", path, body ?? {}),
  patch: <T>(path: string, body: unknown) => request<T>("PATCH", path, body),
  put: <T>(path: string, body: unknown) => request<T>("PUT", path, body),
  delete: <T = void>(path: string) => request<T>("DELETE", path),
};

export function isApiError(error: unknown): error is ApiError {
  return error instanceof ApiError;
}

/** A sentence to show for any error (an ApiError's own message, or a generic one). */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error && error.message) return error.message;
  return "Something went wrong.";
}
