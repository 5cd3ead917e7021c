/**
 * A row's children read in the row's own statement: a correlated subquery aggregates them into one JSON
 * array, read back through each column's own mapping (a timestamp comes back a Date), so they are typed
 * as their table's rows and a renamed column fails `tsc`. One statement, as the relational API gave.
 */
import { Column, is, sql, type GetColumnData, type SQL } from "drizzle-orm";

/** The columns of one JSON object, keyed as the result is; a nested shape is a nested object. */
export type JsonShape = { [key: string]: Column | JsonShape | OptionalShape<JsonShape> };

/** A nested object that is null when `when` (a column of a left join) is null. */
class OptionalShape<S extends JsonShape> {
  constructor(
    readonly shape: S,
    readonly when: Column,
  ) {}
}
export const orNull = <S extends JsonShape>(shape: S, when: Column) => new OptionalShape(shape, when);

export type JsonRow<S extends JsonShape> = {
  [Key in keyof S]: S[Key] extends Column
    ? GetColumnData<S[Key]>
    : S[Key] extends OptionalShape<infer Inner>
      ? JsonRow<Inner> | null
      : S[Key] extends JsonShape
        ? JsonRow<S[Key]>
        : never;
};

function objectSql(shape: JsonShape): SQL {
  const pairs = Object.entries(shape).map(([key, value]) => {
    const valueSql = is(value, Column)
      ? sql`${value}`
      : value instanceof OptionalShape
        ? sql`case when ${value.when} is null then null else ${objectSql(value.shape)} end`
        : objectSql(value);
    return sql`${sql.raw(`'${key}'`)}, ${valueSql}`;
  });
  return sql`json_build_object(${sql.join(pairs, sql`, `)})`;
}

function decode<S extends JsonShape>(shape: S, value: Record<string, unknown>): JsonRow<S> {
  const entries = Object.entries(shape).map(([key, part]) => {
    const raw = value[key];
    if (is(part, Column)) return [key, raw === null ? null : part.mapFromDriverValue(raw)];
    if (raw === null) return [key, null];
    return [key, decode(part instanceof OptionalShape ? part.shape : part, raw as Record<string, unknown>)];
  });
  return Object.fromEntries(entries) as JsonRow<S>;
}

/**
 * The rows of `from` (a FROM clause with its joins and WHERE, correlated with the outer query) as a
 * JSON array of `shape`, in `orderBy` order; `read` turns the column's value back into typed rows.
 */
export function jsonRows<S extends JsonShape>(shape: S, from: SQL, orderBy?: SQL) {
  return {
    column: sql<
      Record<string, unknown>[]
    >`(select coalesce(json_agg(${objectSql(shape)}${orderBy ? sql` order by ${orderBy}` : sql``}), '[]'::json) ${from})`,
    read: (value: Record<string, unknown>[]) => value.map((row) => decode(shape, row)),
  };
}
