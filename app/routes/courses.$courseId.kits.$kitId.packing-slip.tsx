import { data } from "react-router";
import type { Route } from "./+types/courses.$courseId.kits.$kitId.packing-slip";
import { SafetyCautions } from "~/components/safety-cautions";
import { describePart } from "~/lib/kits/describe-part";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { getKit } from "~/server/kits/kits.server";
import { isEntityId } from "~/lib/forms/ids";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const kit = isEntityId(params.kitId) ? await getKit(db, access.course.id, params.kitId) : null;
  if (!kit) throw data("Not found", { status: 404 });
  return { kit, course: access.course };
}

/** One printed page that travels in the box: what is inside, for whom, and how to stay safe. */
export default function PackingSlip({ loaderData }: Route.ComponentProps) {
  const { kit, course } = loaderData;
  const parts = kit.parts.map(({ part }) => part);
  return (
    <article className="mx-auto max-w-2xl bg-white p-6 print:p-0">
      <header className="flex items-start justify-between border-b border-ink-900/20 pb-3">
        <div>
          <p className="text-sm text-ink-600">
            {course.code} · {course.title}
          </p>
          <h1 className="text-3xl font-semibold">Kit {kit.number}</h1>
        </div>
        <button type="button" onClick={() => window.print()} className="no-print rounded-md bg-ink-800 px-4 py-2 text-sm text-paper-50">
          Print
        </button>
      </header>
      <p className="mt-3">
        For: <strong>{kit.holder?.user.name ?? "not assigned yet"}</strong>
        {kit.holder?.cohort ? ` · ${kit.holder.cohort.name}` : ""}
      </p>
      <table className="mt-4 w-full text-left text-sm">
        <caption className="mb-1 text-left font-medium">Parts and their recorded measurements</caption>
        <thead>
          <tr className="border-b border-ink-900/20">
            <th scope="col" className="py-1 pr-3">
              Label
            </th>
            <th scope="col" className="pr-3">
              Part
            </th>
            <th scope="col" className="pr-3">
              Recorded values
            </th>
            <th scope="col" className="w-16 text-center">
              Packed
            </th>
          </tr>
        </thead>
        <tbody>
          {parts.map((part) => {
            const { kind, values } = describePart(part);
            return (
              <tr key={part.id} className="border-b border-ink-900/10">
                <td className="whitespace-nowrap py-1.5 pr-3 align-top font-medium">{part.label}</td>
                <td className="py-1.5 pr-3 align-top">{kind}</td>
                <td className="py-1.5 pr-3 align-top">{values}</td>
                <td className="py-1.5 text-center align-top">
                  {/* A box to tick by hand on paper; nothing to announce on screen. */}
                  <span aria-hidden="true">☐</span>
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-4 text-sm">
        When the kit arrives, open Benchpost, go to “My kit” and confirm it is complete, or report what is missing or damaged.
      </p>
      <div className="mt-4">
        <SafetyCautions compact />
      </div>
    </article>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Packing slip, kit ${loaderData?.kit.number ?? ""} · Benchpost` }];
}
