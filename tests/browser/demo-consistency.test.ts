/**
 * The seeded demo agrees with itself: its term label names the months its labs are held in, and a
 * kit's "sent" day is the day its history moved it to in transit. Reads the demo the browser suite serves.
 */
import { sql } from "drizzle-orm";
import { afterAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { demoCourse, termOf } from "../../seeds/demo-scenario";

describe("the demo's dates", () => {
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  afterAll(async () => {
    await pool.end();
  });

  it("names the term after the month its first lab opens, and each kit was sent the day it went in transit", async () => {
    const { rows: courses } = await db.execute<{ id: string; term: string; time_zone: string; first_opens: Date }>(sql`
      select c.id, c.term, c.time_zone, min(l.opens_at) as first_opens
      from courses c join labs l on l.course_id = c.id
      where c.code = ${demoCourse.code} and c.archived_at is null and c.term = ${demoCourse.term}
      group by c.id`);
    expect(courses).toHaveLength(1);
    const [course] = courses;
    expect(course.term).toBe(termOf(new Date(course.first_opens), course.time_zone));

    const { rows: kits } = await db.execute<{ number: string; shipped_on: string; moved_on: string | null }>(sql`
      select k.number, k.shipped_on::text,
        (select (e.created_at at time zone ${course.time_zone})::date::text from kit_events e
          where e.kit_id = k.id and e.to_state = 'in_transit' order by e.created_at desc limit 1) as moved_on
      from kits k join courses c on c.id = k.course_id
      where k.course_id = ${course.id} and k.shipped_on is not null
        -- Kits as seeded: the seed dates their history before the course row; other suites ship kits today.
        and not exists (select 1 from kit_events later where later.kit_id = k.id and later.created_at > c.created_at)`);
    expect(kits.length).toBeGreaterThan(0);
    expect(kits.filter((kit) => kit.shipped_on !== kit.moved_on)).toEqual([]);
  });
});
