/**
 * insertMany, the one-parameter bulk insert: every row is written with the columns it names, and a
 * batch whose rows name different columns is refused before anything is sent, because the insert
 * writes only the first row's columns and would silently drop the others.
 */
import { randomUUID } from "node:crypto";
import { inArray } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { users } from "~/db/schema";
import { insertMany } from "~/server/bulk-insert.server";
import { db } from "~/server/db.server";
import { countStatements } from "../support/count-statements";

const person = (label: string) => ({ id: randomUUID(), email: `${label}@bulk-insert.example`, name: label });

describe("insertMany", () => {
  it("writes every row with the columns it names, whatever the order of its keys", async () => {
    const first = { ...person("ada"), studentNumber: "A-1", mayCreateCourses: true };
    const second = { mayCreateCourses: false, studentNumber: null, ...person("bo") };
    const ids = await insertMany(db, users, [first, second]);
    expect(new Set(ids)).toEqual(new Set([first.id, second.id]));
    const stored = await db
      .select({ id: users.id, studentNumber: users.studentNumber, mayCreateCourses: users.mayCreateCourses })
      .from(users)
      .where(inArray(users.id, ids));
    expect(stored).toEqual(
      expect.arrayContaining([
        { id: first.id, studentNumber: "A-1", mayCreateCourses: true },
        { id: second.id, studentNumber: null, mayCreateCourses: false },
      ]),
    );
  });

  it("refuses a row naming a column the first row does not, and writes nothing", async () => {
    // The case that once lost data: the second row's flag would have been dropped for the default, false.
    const rows = [person("cy"), { ...person("di"), mayCreateCourses: true }];
    const { statements, result } = await countStatements(() => insertMany(db, users, rows).catch((error: unknown) => error));
    expect(result).toBeInstanceOf(Error);
    expect((result as Error).message).toMatch(
      /insertMany into users: row 1 names the columns id, email, name, mayCreateCourses, but the first row names id, email, name/,
    );
    expect(statements).toBe(0);
    expect(
      await db
        .select({ id: users.id })
        .from(users)
        .where(
          inArray(
            users.id,
            rows.map((row) => row.id),
          ),
        ),
    ).toEqual([]);
  });

  it("refuses a row that leaves out a column the first row names", async () => {
    const rows = [{ ...person("ed"), studentNumber: "E-5" }, person("flo")];
    await expect(insertMany(db, users, rows)).rejects.toThrow(
      /row 1 names the columns id, email, name, but the first row names id, email, name, studentNumber/,
    );
  });
});
