import { data } from "react-router";
import type { Route } from "./+types/courses.$courseId.my-address[.]json";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { auditAddressViews, getAddress } from "~/server/shipping/addresses.server";

/** The student's own address as a file they keep: what Benchpost holds about where they live, and when it changed. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["student"]);
  const address = await getAddress(db, access.course.id, { membershipId: access.membership.id });
  if (!address) throw data("You have no address in this course.", { status: 404 });
  await auditAddressViews(db, {
    courseId: access.course.id,
    actorId: access.user.id,
    request,
    subjects: [access.membership.id],
    action: "address.exported",
  });
  const { updatedAt, ...postal } = address;
  const file = { course: `${access.course.code} ${access.course.title}`, address: postal, updatedAt: updatedAt.toISOString() };
  return new Response(JSON.stringify(file, null, 2), {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="${`${access.course.code}-my-address.json`.replace(/[^\w.-]/g, "_")}"`,
      "Cache-Control": "no-store",
    },
  });
}
