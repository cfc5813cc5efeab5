/**
 * The SQLite driver we use: MikroORM's better-sqlite driver with four changes.
 * 1. Values are bound as statement parameters instead of being written into the SQL text (MikroORM 6
 *    inlines them with its own quoting, which breaks on a NUL and puts e-mail addresses and password hashes
 *    into every failed statement's message). Statements whose parameters are lists or objects (none of ours;
 *    kept for safety) fall back to MikroORM's own path.
 * 2. Every connection runs in WAL journal mode with a busy timeout (readers do not wait for the writer;
 *    a writer waits up to `BUSY_TIMEOUT_MS` for another instead of failing with SQLITE_BUSY).
 * 3. Each statement's result is handed back after a turn of the event loop (see `afterATurn`).
 * 4. A file database gets a second connection for reads (see `BoundSqliteDriver`).
 */
import { BetterSqliteConnection, BetterSqliteDriver, BetterSqlitePlatform } from '@mikro-orm/better-sqlite';
import type { Configuration, Transaction } from '@mikro-orm/core';
import type { Knex } from '@mikro-orm/knex';

export const BUSY_TIMEOUT_MS = 5000;

function bindable(value: unknown): boolean {
  return (
    value === null ||
    value === undefined ||
    typeof value === 'string' ||
    typeof value === 'number' ||
    typeof value === 'bigint' ||
    typeof value === 'boolean' ||
    value instanceof Date ||
    Buffer.isBuffer(value) ||
    value instanceof Uint8Array
  );
}

/**
 * Resolves with `value` after one turn of the event loop. better-sqlite3 runs each statement synchronously and
 * the ORM chains the next statement (of this request or, through the one-connection pool, of the next request)
 * in promise callbacks: without a turn between them, a burst of requests runs all its statements back to back
 * and a waiting request such as `GET /api/health` is read from its socket only after the whole burst.
 */
function afterATurn<T>(value: T): Promise<T> {
  return new Promise((resolve) => setImmediate(resolve, value));
}

export class BoundSqliteConnection extends BetterSqliteConnection {
  override async connect(): Promise<void> {
    await super.connect();
    const dbName = this.config.get('dbName');
    if (dbName && dbName !== ':memory:') await this.getKnex().raw('pragma journal_mode = wal');
    await this.getKnex().raw(`pragma busy_timeout = ${BUSY_TIMEOUT_MS}`);
  }

  override async execute<T>(
    queryOrKnex: string | Knex.QueryBuilder | Knex.Raw,
    params: unknown[] = [],
    method: 'all' | 'get' | 'run' = 'all',
    ctx?: Transaction,
    loggerContext?: Parameters<BetterSqliteConnection['execute']>[4],
  ): Promise<T> {
    await this.ensureConnection();
    let sql: string;
    if (typeof queryOrKnex === 'object') {
      ctx ??= ((queryOrKnex as unknown as { client: { transacting?: unknown } }).client.transacting ? queryOrKnex : undefined) as Transaction | undefined;
      const q = queryOrKnex.toSQL();
      sql = q.sql;
      params = [...(q.bindings ?? [])];
    } else {
      sql = queryOrKnex;
    }
    if (params.length === 0 || !params.every(bindable) || sql.includes('??')) {
      return afterATurn(await (super.execute<never>(sql, params, method, ctx, loggerContext) as Promise<T>));
    }
    sql = this.config.get('onQuery')(sql, params);
    const bindings = params.map((p) => (p === undefined ? null : p instanceof Uint8Array && !Buffer.isBuffer(p) ? Buffer.from(p) : p)) as Knex.RawBinding[];
    // The logged text is the statement with `?` placeholders: values never reach a log line.
    const result = await this.executeQuery<T>(
      sql,
      async () => {
        const query = this.getKnex().raw(sql, bindings);
        if (ctx) query.transacting(ctx as Knex.Transaction);
        const res = await query;
        return this.transformRawResult<T>(res, method);
      },
      { query: sql, params: [], ...loggerContext },
    );
    return afterATurn(result);
  }
}

export class BoundSqliteDriver extends BetterSqliteDriver {
  constructor(config: Configuration) {
    super(config);
    // Swap the connection class the base constructor created (same config, same platform).
    (this as unknown as { connection: BoundSqliteConnection }).connection = new BoundSqliteConnection(config);
    // A second connection to the same file for reads outside transactions (ORM finds, and raw reads asked for
    // with `getConnection('read')`). Each connection is a pool of one: without this, every read waits for
    // the one connection while a long write transaction (a large corpus) holds it. In WAL mode a reader sees
    // the last committed state and never waits for the writer. An in-memory database cannot be opened twice.
    const dbName = config.get('dbName');
    (this as unknown as { replicas: unknown[] }).replicas = dbName && dbName !== ':memory:' ? [new BoundSqliteConnection(config, undefined, 'read')] : [];
  }
}

export { BetterSqlitePlatform };
