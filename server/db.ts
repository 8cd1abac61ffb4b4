/** The database: a Knex instance over mysql2, and the migration runner. */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import knex, { type Knex } from 'knex';

export type Db = Knex;

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

export function createDb(databaseUrl: string, poolMax = 20): Db {
  const url = new URL(databaseUrl);
  return knex({
    client: 'mysql2',
    connection: {
      host: url.hostname,
      port: Number(url.port || 3306),
      user: decodeURIComponent(url.username),
      password: decodeURIComponent(url.password),
      database: url.pathname.replace(/^\//, '') || undefined,
      charset: 'utf8mb4',
      timezone: 'Z',
      dateStrings: false,
      supportBigNumbers: true,
      connectTimeout: 5000,
      // DOUBLE columns come back as numbers; DECIMAL is not used.
      decimalNumbers: true,
    },
    pool: {
      min: 0,
      max: poolMax,
      idleTimeoutMillis: 30_000,
      // Every connection works in UTC, so DEFAULT NOW(3) and JavaScript dates agree.
      afterCreate(conn: { query: (sql: string, cb: (err: Error | null) => void) => void }, done: (err: Error | null, conn: unknown) => void) {
        conn.query("SET time_zone = '+00:00'", (err) => done(err, conn));
      },
    },
    // Fail fast when the database is away: requests answer 503 instead of hanging.
    acquireConnectionTimeout: 5000,
    // Connection failures surface as request errors (503) and in the health check; knex's own
    // console warnings would only repeat them.
    log: { warn() {}, error() {}, deprecate() {}, debug() {} },
  });
}

/** Migrations are the TypeScript files in migrations/, applied in file-name order. */
class DirectoryMigrationSource implements Knex.MigrationSource<string> {
  constructor(private readonly dir: string) {}
  async getMigrations() {
    return fs
      .readdirSync(this.dir)
      .filter((f) => /^\d{4}_.+\.ts$/.test(f))
      .sort();
  }
  getMigrationName(migration: string) {
    return migration.replace(/\.ts$/, '');
  }
  async getMigration(migration: string) {
    return (await import(pathToFileURL(path.join(this.dir, migration)).href)) as Knex.Migration;
  }
}

export const migrationConfig: Knex.MigratorConfig = {
  migrationSource: new DirectoryMigrationSource(path.join(root, 'migrations')),
  tableName: 'knex_migrations',
};

export async function migrateLatest(db: Db) {
  const [, applied] = await db.migrate.latest(migrationConfig);
  return applied as string[];
}

/** True when the error means "the database is not reachable" rather than a bad query. */
export function isDbUnavailable(error: unknown): boolean {
  const e = error as { code?: string; errno?: number; name?: string; message?: string; fatal?: boolean };
  if (!e || typeof e !== 'object') return false;
  const codes = new Set([
    'ECONNREFUSED',
    'ECONNRESET',
    'ETIMEDOUT',
    'EPIPE',
    'EHOSTUNREACH',
    'ENOTFOUND',
    'PROTOCOL_CONNECTION_LOST',
    'PROTOCOL_SEQUENCE_TIMEOUT',
    'ER_CON_COUNT_ERROR',
    'ER_SERVER_SHUTDOWN',
    'ER_CONNECTION_KILLED',
    'ER_SERVER_GONE_ERROR',
    'ER_SERVER_LOST',
    'ER_SERVER_LOST_EXTENDED',
    'ER_UNKNOWN_COM_ERROR',
    'ER_QUERY_INTERRUPTED',
    'ER_CLIENT_INTERACTION_TIMEOUT',
    'ER_LOCK_WAIT_TIMEOUT',
  ]);
  if (e.code && codes.has(e.code)) return true;
  if (e.fatal === true) return true;
  if (e.name === 'KnexTimeoutError') return true;
  const message = String(e.message ?? '');
  return /connection is in closed state|Can't add new command when connection is in closed state|Connection lost|read ECONNRESET|Pool is closed|aborted transaction/i.test(
    message,
  );
}

/** Connections of the pool in use, being opened, or waited for: 0 when no work needs the database. */
export function poolInUse(db: Db): number {
  const pool = (db.client as { pool?: { numUsed(): number; numPendingAcquires(): number; numPendingCreates(): number } }).pool;
  return pool ? pool.numUsed() + pool.numPendingAcquires() + pool.numPendingCreates() : 0;
}

/**
 * A raw query straight on a pooled mysql2 connection, skipping Knex's query builder and runner.
 * For the few queries that run on every request (token and session lookups, observations);
 * everything else uses Knex. Same pool, same reconnection and timeout behaviour.
 */
export async function fastQuery<T = Record<string, any>>(db: Db, sql: string, bindings: unknown[]): Promise<T[]> {
  const client = db.client as unknown as { acquireConnection(): Promise<any>; releaseConnection(c: unknown): Promise<void> };
  const conn = await client.acquireConnection();
  try {
    return await new Promise<T[]>((resolve, reject) => conn.query({ sql, values: bindings }, (err: Error | null, rows: T[]) => (err ? reject(err) : resolve(rows))));
  } finally {
    await client.releaseConnection(conn);
  }
}
