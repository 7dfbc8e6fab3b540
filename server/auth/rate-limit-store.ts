import type { Knex } from 'knex';
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';

/** express-rate-limit store in PostgreSQL, so the count is shared by every server instance. */
export class PostgresRateLimitStore implements Store {
  windowMs = 60_000;
  localKeys = false;
  constructor(
    private readonly knex: Knex,
    readonly prefix: string,
  ) {}

  init(options: Options) {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const row = await this.knex('rate_limits').where({ key: this.prefix + key }).where('reset_at', '>', new Date()).first();
    return row ? { totalHits: row.hits, resetTime: row.reset_at } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const resetAt = new Date(Date.now() + this.windowMs);
    const { rows } = await this.knex.raw(
      `INSERT INTO rate_limits (key, hits, reset_at) VALUES (?, 1, ?)
       ON CONFLICT (key) DO UPDATE SET
         hits = CASE WHEN rate_limits.reset_at <= now() THEN 1 ELSE rate_limits.hits + 1 END,
         reset_at = CASE WHEN rate_limits.reset_at <= now() THEN EXCLUDED.reset_at ELSE rate_limits.reset_at END
       RETURNING hits, reset_at`,
      [this.prefix + key, resetAt],
    );
    return { totalHits: rows[0].hits, resetTime: rows[0].reset_at };
  }

  async decrement(key: string): Promise<void> {
    await this.knex('rate_limits').where({ key: this.prefix + key }).where('hits', '>', 0).decrement('hits', 1);
  }

  async resetKey(key: string): Promise<void> {
    await this.knex('rate_limits').where({ key: this.prefix + key }).delete();
  }
}
