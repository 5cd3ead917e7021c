import { Link } from "react-router";
import type { KitMention } from "~/server/kits/parts.server";

/** A kit the page mentions, linked only when the viewer may open it. */
export function KitName({ kit, courseId }: { kit: KitMention; courseId: string }) {
  return kit.id ? (
    <Link to={`/courses/${courseId}/kits/${kit.id}`} className="underline">
      Kit {kit.number}
    </Link>
  ) : (
    <>Kit {kit.number}</>
  );
}
