/**
 * Reads a calendar feed with ical.js, a parser independent of the ical-generator that writes it: what a
 * calendar app would see of each event.
 */
import ICAL from "ical.js";

export type ParsedEvent = {
  uid: string;
  summary: string;
  description: string;
  url: string | null;
  /** An instant as ISO text in UTC, or a calendar day (`2027-05-28`) for an all-day event. */
  start: string;
  end: string | null;
  allDay: boolean;
};

const asText = (time: ICAL.Time): string => (time.isDate ? time.toString() : time.toJSDate().toISOString());

export function parseFeed(text: string): { name: string | null; events: ParsedEvent[] } {
  const calendar = new ICAL.Component(ICAL.parse(text));
  const events = calendar.getAllSubcomponents("vevent").map((component) => {
    const event = new ICAL.Event(component);
    return {
      uid: event.uid,
      summary: event.summary,
      description: event.description,
      url: (component.getFirstPropertyValue("url") as string | null) ?? null,
      start: asText(event.startDate),
      end: component.hasProperty("dtend") ? asText(event.endDate) : null,
      allDay: event.startDate.isDate,
    };
  });
  return { name: (calendar.getFirstPropertyValue("x-wr-calname") as string | null) ?? null, events };
}

export const eventByUid = (events: ParsedEvent[], uid: string) => events.find((event) => event.uid === uid);
