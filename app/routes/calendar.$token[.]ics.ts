import type { Route } from "./+types/calendar.$token[.]ics";
import { buildCalendarFeed } from "~/lib/calendar/calendar-feed";
import { calendarFeedOwner, loadCalendarFeedRows } from "~/server/calendar/feed.server";
import { appUrl } from "~/server/config.server";
import { db } from "~/server/db.server";

/**
 * A user's private calendar feed. Calendar apps fetch it without a session: the token in the address is
 * the key (see feed.server.ts). An unknown token answers a bare 404 that says nothing about why.
 */
export async function loader({ params }: Route.LoaderArgs) {
  const owner = await calendarFeedOwner(db, params.token);
  if (!owner) return new Response("Not found", { status: 404, headers: { "Content-Type": "text/plain; charset=utf-8" } });
  const feed = buildCalendarFeed(await loadCalendarFeedRows(db, owner.id), { ownerName: owner.name, baseUrl: appUrl() });
  return new Response(feed, {
    headers: {
      "Content-Type": "text/calendar; charset=utf-8",
      "Content-Disposition": 'inline; filename="benchpost.ics"',
      // Private to its owner: no shared cache keeps it, and a reset takes effect at the next fetch.
      "Cache-Control": "private, no-store",
    },
  });
}
