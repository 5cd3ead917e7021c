/**
 * Inserting thousands of rows at once (a roster import, a class relabel, bulk marking) in one
 * statement with one parameter: the rows travel as a JSON array that PostgreSQL unpacks with
 * `json_populate_recordset`. Drizzle's multi-row insert builds one placeholder per value, which costs
 * seconds of CPU for a few thousand rows and hits the 65,535-parameter limit soon after.
 */
import { getTableColumns, getTableName, sql, type InferInsertModel } from "drizzle-orm";
import type { PgTable } from "drizzle-orm/pg-core";
import type { Executor } from "~/server/db.server";

/**
 * Inserts `rows` into `table` and returns the ids written. Every row must name the same columns: the
 * insert writes the columns the first row names (every other column takes its default), so a row
 * naming others would lose them, and is refused instead. `onConflictDoNothing` skips rows that hit a
 * unique index (their ids are then missing from the answer).
 */
export async function insertMany<Table extends PgTable>(
  executor: Executor,
  table: Table,
  rows: InferInsertModel<Table>[],
  options: { onConflictDoNothing?: boolean } = {},
): Promise<string[]> {
  if (rows.length === 0) return [];
  const columns = getTableColumns(table);
  const keys = Object.keys(rows[0]).filter((key) => key in columns);
  const firstRowKeys = new Set(keys);
  rows.forEach((row, index) => {
    const rowKeys = Object.keys(row).filter((key) => key in columns);
    if (rowKeys.length !== keys.length || !rowKeys.every((key) => firstRowKeys.has(key))) {
      throw new Error(
        `insertMany into ${getTableName(table)}: row ${index} names the columns ${rowKeys.join(", ")}, but the first row names ${keys.join(", ")}. ` +
          "Only the first row's columns are written; give every row the same keys (null where there is no value), or insert the groups separately.",
      );
    }
  });
  const names = keys.map((key) => sql.identifier(columns[key].name));
  const payload = rows.map((row) =>
    Object.fromEntries(keys.map((key) => [columns[key].name, (row as Record<string, unknown>)[key] ?? null])),
  );
  const tableName = sql.identifier(getTableName(table));
  const result = await executor.execute(sql`
    insert into ${tableName} (${sql.join(names, sql`, `)})
    select ${sql.join(names, sql`, `)} from json_populate_recordset(null::${tableName}, ${JSON.stringify(payload)}::json)
    ${options.onConflictDoNothing ? sql`on conflict do nothing` : sql``}
    ${"id" in columns ? sql`returning ${sql.identifier(columns.id.name)} as id` : sql``}`);
  return result.rows.map((row) => String((row as { id: unknown }).id));
}
