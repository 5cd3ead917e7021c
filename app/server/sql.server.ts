/**
 * SQL expressions the query builder lacks, written over schema columns so that a renamed column fails
 * the typecheck.
 */
import { sql, type SQLWrapper } from "drizzle-orm";

type IsoText<T> = T extends { _: { notNull: true } } ? string : string | null;

/** A timestamp as PostgreSQL writes it in JSON (`2026-03-02T09:00:00+00:00`), the text pages and the API return. */
export const isoText = <T extends SQLWrapper>(value: T) => sql<IsoText<T>>`to_json(${value})#>>'{}'`;

/** Ids as one parameter, for `inArray(column, uuidList(ids))`: the statement is the same whatever their number. */
export const uuidList = (ids: string[]) => sql`(select value::uuid from json_array_elements_text(${JSON.stringify(ids)}::json))`;
