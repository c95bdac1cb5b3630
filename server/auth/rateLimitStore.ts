// A store for express-rate-limit kept in PostgreSQL, so every app process counts the same hits.
import type { ClientRateLimitInfo, Options, Store } from "express-rate-limit";
import { sql } from "drizzle-orm";
import type { Database } from "../db";

export class PostgresRateLimitStore implements Store {
  private windowMs = 60_000;
  constructor(
    private readonly db: Database,
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const k = `${this.prefix}:${key}`;
    const resetAt = new Date(Date.now() + this.windowMs);
    const result = await this.db.execute<{ hits: number; reset_at: Date }>(sql`
      INSERT INTO rate_limit_hits (key, hits, reset_at) VALUES (${k}, 1, ${resetAt.toISOString()})
      ON CONFLICT (key) DO UPDATE SET
        hits = CASE WHEN rate_limit_hits.reset_at <= now() THEN 1 ELSE rate_limit_hits.hits + 1 END,
        reset_at = CASE WHEN rate_limit_hits.reset_at <= now() THEN EXCLUDED.reset_at ELSE rate_limit_hits.reset_at END
      RETURNING hits, reset_at`);
    const row = result.rows[0];
    return { totalHits: Number(row.hits), resetTime: new Date(row.reset_at) };
  }

  async decrement(key: string): Promise<void> {
    await this.db.execute(sql`UPDATE rate_limit_hits SET hits = GREATEST(hits - 1, 0) WHERE key = ${`${this.prefix}:${key}`}`);
  }

  async resetKey(key: string): Promise<void> {
    await this.db.execute(sql`DELETE FROM rate_limit_hits WHERE key = ${`${this.prefix}:${key}`}`);
  }
}
