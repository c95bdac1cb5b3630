import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { randomBytes } from "node:crypto";
import { join } from "node:path";

export type Environment = "production" | "development" | "test";

export interface AppConfig {
  environment: Environment;
  host: string;
  port: number;
  /** The app's public origin, used in e-mailed links and the cross-origin check. */
  appUrl: string;
  databaseUrl: string;
  sessionSecret: Uint8Array;
  sessionTtlSeconds: number;
  smtpUrl: string | null;
  mailFrom: string;
  /**
   * Sign-in, reset and password-change limits per window: `perIp` failed sign-ins per client
   * address; `perAccount` free failed sign-ins per account before each answer waits `delayMs`,
   * doubling (reset requests and password changes: a cap per account).
   */
  loginLimit: { windowMs: number; perIp: number; perAccount: number; delayMs?: number };
  /** Sign-ups per window, per client address and per e-mail. */
  signupLimit: { windowMs: number; perIp: number; perAddress: number };
  uploadDir: string;
  /** Whether this process takes jobs from the shared queue (JOB_WORKERS=0 makes a web-only process). */
  jobWorkers: boolean;
  /** Taxa this process keeps in memory for fast grid filters and sorts, over all studies (GRID_MAX_TAXA). */
  gridMaxTaxa: number;
}

export const DATA_DIR = join(process.cwd(), ".data");

/** The app's version (package.json), stored with every run and comparison and named in the API document. */
export const APP_VERSION = (JSON.parse(readFileSync(new URL("../package.json", import.meta.url), "utf8")) as { version: string }).version;

/**
 * After how many seconds without a heartbeat a running run counts as interrupted (twelve missed
 * beats); RUN_STALE_SECONDS shortens it where a test kills a process on purpose.
 */
export const RUN_STALE_AFTER_SECONDS = Number(process.env.RUN_STALE_SECONDS) > 0 ? Number(process.env.RUN_STALE_SECONDS) : 60;

/** SESSION_SECRET, or a random secret generated once into .data/ so sessions survive restarts. */
export function loadSessionSecret(): string {
  if (process.env.SESSION_SECRET) return process.env.SESSION_SECRET;
  const file = join(DATA_DIR, "session-secret");
  if (existsSync(file)) return readFileSync(file, "utf8").trim();
  mkdirSync(DATA_DIR, { recursive: true });
  const secret = randomBytes(48).toString("base64url");
  writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}

export function loadConfig(overrides: Partial<AppConfig> = {}): AppConfig {
  const env = process.env;
  const environment: Environment =
    env.NODE_ENV === "production" ? "production" : env.NODE_ENV === "test" ? "test" : "development";
  const host = env.HOST ?? "127.0.0.1";
  const port = Number(env.PORT ?? 5180);
  if (!env.DATABASE_URL && !overrides.databaseUrl) throw new Error("DATABASE_URL is not set.");
  const secret = overrides.sessionSecret ?? new TextEncoder().encode(loadSessionSecret());
  if (secret.length < 32) throw new Error("SESSION_SECRET must be at least 32 characters long.");
  return {
    environment,
    host,
    port,
    appUrl: (env.APP_URL ?? `http://${host}:${port}`).replace(/\/$/, ""),
    databaseUrl: env.DATABASE_URL ?? "",
    sessionSecret: secret,
    sessionTtlSeconds: Number(env.SESSION_TTL_HOURS ?? 24 * 14) * 3600,
    smtpUrl: env.SMTP_URL || null,
    mailFrom: env.MAIL_FROM ?? "Stratasieve <no-reply@stratasieve.invalid>",
    loginLimit: {
      windowMs: 15 * 60 * 1000,
      perIp: Number(env.LOGIN_LIMIT_PER_IP ?? 50),
      perAccount: Number(env.LOGIN_LIMIT_PER_ACCOUNT ?? 10),
      delayMs: 1000,
    },
    signupLimit: {
      windowMs: 60 * 60 * 1000,
      perIp: Number(env.SIGNUP_LIMIT_PER_IP ?? 20),
      perAddress: 5,
    },
    uploadDir: env.UPLOAD_DIR ?? join(DATA_DIR, "uploads"),
    jobWorkers: env.JOB_WORKERS !== "0",
    gridMaxTaxa: positiveInteger("GRID_MAX_TAXA", env.GRID_MAX_TAXA, 500_000),
    ...overrides,
  };
}

function positiveInteger(name: string, text: string | undefined, fallback: number): number {
  if (text === undefined || text === "") return fallback;
  const n = Number(text);
  if (!Number.isInteger(n) || n < 1) throw new Error(`${name} must be a whole number from 1 (it is "${text}").`);
  return n;
}
