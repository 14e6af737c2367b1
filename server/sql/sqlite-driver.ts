// The app's SQLite driver: MikroORM's own, with a connection whose `execute` binds every value as a parameter
// (executeBound in server/sql/query.ts) instead of formatting it into the SQL text. The ORM's finds, flushes and
// migrations all reach the database through `execute`, so this covers them as well as hand-written SQL.
// Another dialect gets the same two small classes around its own connection and driver.
import { SqliteConnection, SqliteDriver, type Configuration } from '@mikro-orm/sqlite';
import { executeBound, type SqlMethod } from './query.ts';

export class BoundSqliteConnection extends SqliteConnection {
  override execute<T>(queryOrKnex: Parameters<SqliteConnection['execute']>[0], params: unknown[] = [], method: SqlMethod = 'all', ctx?: unknown, loggerContext?: object): Promise<T> {
    return executeBound<T>(this, queryOrKnex as never, params, method, ctx, loggerContext);
  }
}

export class BoundSqliteDriver extends SqliteDriver {
  constructor(config: Configuration) {
    super(config);
    const self = this as unknown as { connection: unknown; replicas: unknown[]; createReplicas(make: (conf: unknown) => unknown): unknown[] };
    self.connection = new BoundSqliteConnection(this.config);
    self.replicas = self.createReplicas((conf) => new BoundSqliteConnection(this.config, conf as never, 'read'));
  }
}
