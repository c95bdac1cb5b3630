// Where the command line finds the app and its token, and the generated client bound to them.
// Saved by `sieve login` in a file only its owner can read; SIEVE_URL and SIEVE_TOKEN (or --url
// and --token) override it, so a pipeline needs no file at all.
import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { homedir } from "node:os";
import { dirname, join } from "node:path";
import { createClient, createConfig, type Client } from "./generated/client";

export interface Credentials {
  url: string;
  token: string;
}

export const credentialsFile = () => process.env.SIEVE_CONFIG ?? join(process.env.XDG_CONFIG_HOME ?? join(homedir(), ".config"), "stratasieve", "cli.json");

export function saveCredentials(credentials: Credentials): string {
  const file = credentialsFile();
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, JSON.stringify(credentials, null, 2) + "\n", { mode: 0o600 });
  chmodSync(file, 0o600);
  return file;
}

/** --url/--token, then SIEVE_URL/SIEVE_TOKEN, then the saved file; a clear error when none gives both. */
export function loadCredentials(flags: { url?: string; token?: string }): Credentials {
  const file = credentialsFile();
  const saved: Partial<Credentials> = existsSync(file) ? (JSON.parse(readFileSync(file, "utf8")) as Partial<Credentials>) : {};
  const url = flags.url || process.env.SIEVE_URL || saved.url;
  const token = flags.token || process.env.SIEVE_TOKEN || saved.token;
  if (!url || !token) throw new CliError("No app address or token: run `sieve login --url <address> --token <token>` first, or set SIEVE_URL and SIEVE_TOKEN.");
  return { url: url.replace(/\/$/, ""), token };
}

/** The generated client, sending the token as a bearer token (never as a cookie). */
export function connect(credentials: Credentials): Client {
  return createClient(
    createConfig({
      baseUrl: credentials.url,
      auth: (scheme) => (scheme.scheme === "bearer" ? credentials.token : undefined),
    }),
  );
}

/** A failure the user can act on: printed as it is, exit code 1. */
export class CliError extends Error {}

/** The API's error answer in one line: its message and each field at fault. */
export function describeFailure(status: number | undefined, error: unknown): string {
  const body = error as { error?: { message?: string; fields?: Record<string, string> } } | undefined;
  const message = body?.error?.message ?? (typeof error === "string" && error ? error : "no message");
  const fields = Object.entries(body?.error?.fields ?? {}).map(([field, text]) => `${field}: ${text}`);
  return [`The app answered ${status ?? "nothing"}: ${message}`, ...fields].join("\n  ");
}

const reason = (err: unknown) => (err instanceof Error ? (err.cause instanceof Error ? err.cause.message : err.message) : String(err));

/** The data of a generated call, or a CliError with the app's message. */
export async function expectData<T>(call: Promise<{ data?: T; error?: unknown; response?: Response }>): Promise<T> {
  let result: { data?: T; error?: unknown; response?: Response };
  try {
    result = await call;
  } catch (err) {
    throw new CliError(`The app could not be reached: ${reason(err)}`);
  }
  // The generated client answers a network failure with an error and no response.
  if (!result.response) throw new CliError(`The app could not be reached: ${reason(result.error)}`);
  if (result.error !== undefined || !result.response.ok) throw new CliError(describeFailure(result.response.status, result.error));
  return result.data as T;
}
