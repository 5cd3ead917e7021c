import type { Route } from "./+types/courses.$courseId.inventory[.]csv";
import { csvResponse } from "~/lib/csv";
import { inventoryCsv } from "~/lib/kits/parts-csv";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { listInventory } from "~/server/kits/parts.server";

/** The whole inventory in the import's columns plus status and kit number; it imports back into another course. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor", "ta"]);
  const parts = await listInventory(db, access.course.id);
  return csvResponse(`${access.course.code}-${access.course.term}-inventory.csv`, inventoryCsv(parts));
}
