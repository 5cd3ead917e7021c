import { NavLink } from "react-router";
import type { ViewerRole } from "./app-shell";

/** The rooms of a course, as the viewer's role opens them. */
export function courseRooms(courseId: string, role: ViewerRole): { to: string; label: string }[] {
  const base = `/courses/${courseId}`;
  if (role === "student") {
    return [
      { to: base, label: "Overview" },
      { to: `${base}/labs`, label: "Labs" },
      { to: `${base}/my-kit`, label: "My kit" },
    ];
  }
  const staff = [
    { to: base, label: "Overview" },
    { to: `${base}/labs`, label: "Labs" },
    { to: `${base}/kits`, label: "Kits" },
    { to: `${base}/parts`, label: "Parts" },
    { to: `${base}/messages`, label: "Messages" },
    { to: `${base}/mark-book`, label: "Mark book" },
  ];
  if (role === "ta") return staff;
  return [
    ...staff,
    { to: `${base}/members`, label: "Members" },
    { to: `${base}/roster`, label: "Roster import" },
    { to: `${base}/settings`, label: "Settings" },
    { to: `${base}/audit`, label: "Audit log" },
  ];
}

export function CourseNav({ courseId, role }: { courseId: string; role: ViewerRole }) {
  return (
    <nav aria-label="Course" className="no-print -mx-4 mb-6 overflow-x-auto border-b border-ink-900/10 px-4">
      <ul className="flex gap-1 whitespace-nowrap">
        {courseRooms(courseId, role).map((room) => (
          <li key={room.to}>
            <NavLink
              to={room.to}
              end={room.to === `/courses/${courseId}`}
              className={({ isActive }) =>
                `inline-block border-b-2 px-3 py-2 text-sm ${isActive ? "border-amber-500 font-medium text-ink-900" : "border-transparent text-ink-600 hover:text-ink-900"}`
              }
            >
              {room.label}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}
