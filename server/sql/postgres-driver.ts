// The app's PostgreSQL driver: MikroORM's own, with the same bound-parameter connection as SQLite's
// (server/sql/sqlite-driver.ts, executeBound in query.ts) and one platform change (strings without a length).
import { PostgreSqlConnection, PostgreSqlDriver, PostgreSqlPlatform, type Configuration } from '@mikro-orm/postgresql';
import { executeBound, type SqlMethod } from './query.ts';

export class BoundPostgreSqlConnection extends PostgreSqlConnection {
  override execute<T>(queryOrKnex: Parameters<PostgreSqlConnection['execute']>[0], params: unknown[] = [], method: SqlMethod = 'all', ctx?: unknown, loggerContext?: object): Promise<T> {
    return executeBound<T>(this, queryOrKnex as never, params, method, ctx, loggerContext);
  }
}

/**
 * SQLite keeps strings of any length; PostgreSQL's default `varchar(255)` would refuse a long name or reason that
 * SQLite took. A string property without an explicit length is an unbounded `varchar` (the same as `text` in
 * PostgreSQL), so both databases accept the same values and the length rules stay in the shared schemas.
 */
export class RoostlinePostgreSqlPlatform extends PostgreSqlPlatform {
  override getVarcharTypeDeclarationSQL(column: { length?: number }): string {
    return column.length === undefined || column.length === -1 ? 'varchar' : super.getVarcharTypeDeclarationSQL(column);
  }
  override getDefaultVarcharLength(): number {
    return -1;
  }
}

export class BoundPostgreSqlDriver extends PostgreSqlDriver {
  constructor(config: Configuration) {
    super(config);
    const self = this as unknown as { platform: PostgreSqlPlatform; connection: unknown; replicas: unknown[]; createReplicas(make: (conf: unknown) => unknown): unknown[] };
    self.platform = new RoostlinePostgreSqlPlatform();
    self.connection = new BoundPostgreSqlConnection(this.config);
    self.replicas = self.createReplicas((conf) => new BoundPostgreSqlConnection(this.config, conf as never, 'read'));
  }
}
