/**
 * Prepared statements on the hot paths, behind one switch (DATABASE_PREPARED_STATEMENTS). Named, each
 * is parsed and planned once per connection and then sent as a bind and execute; unnamed (a transaction
 * pooler before PgBouncer 1.21 cannot keep a named statement, since the next transaction may get another
 * server connection), node-postgres sends it with its text every time. Either way a statement prepared
 * here is built into SQL once per process, which is most of what Drizzle's builder costs a request.
 */
import { createHash } from "node:crypto";
import type { SQL } from "drizzle-orm";
import { PgDialect } from "drizzle-orm/pg-core";
import type { QueryResult, QueryResultRow } from "pg";
import type { Executor } from "~/server/db.server";
import { environment } from "~/server/env.server";

/**
 * The name to give `.prepare()`: the statement's own, or none when named statements are off. Drizzle
 * types the name as a string but hands it to node-postgres as the query's `name`, where undefined is
 * the unnamed statement; the cast says so here, once.
 */
export function statementName(name: string): string {
  return (environment().DATABASE_PREPARED_STATEMENTS === "on" ? name : undefined) as string;
}

/**
 * A statement on the pool built once (with `sql.placeholder` for its values) and executed many times:
 * `build` is given the name to `.prepare()` with, and is called once for each setting of the switch.
 */
export function preparedStatement<Prepared>(name: string, build: (name: string) => Prepared): () => Prepared {
  const built = new Map<string, Prepared>();
  return () => {
    const given = statementName(name);
    let prepared = built.get(given);
    if (prepared === undefined) {
      prepared = build(given);
      built.set(given, prepared);
    }
    return prepared;
  };
}

const dialect = new PgDialect();

/**
 * `executor.execute(query)` as a prepared statement named after `name` and its text (or unnamed, by the
 * switch), for raw SQL that the query builder cannot write: Drizzle's `execute` has no name to give.
 */
export function executePrepared<Row extends QueryResultRow>(executor: Executor, name: string, query: SQL): Promise<QueryResult<Row>> {
  const built = dialect.sqlToQuery(query);
  // The text's digest in the name: a value Drizzle writes as DEFAULT, not a parameter, changes the text,
  // and one name for two texts is an error on a connection that has prepared the first.
  const named = `${name}_${createHash("sha1").update(built.sql).digest("base64url").slice(0, 12)}`;
  return executor._.session
    .prepareQuery<{ execute: QueryResult<Row>; all: unknown; values: unknown }>(built, undefined, statementName(named), false)
    .execute();
}
