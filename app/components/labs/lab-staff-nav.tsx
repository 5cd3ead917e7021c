import { NavLink } from "react-router";

/** The rooms staff move between for one lab; its settings are the instructors' alone. */
export function LabStaffNav({ courseId, labId, instructor }: { courseId: string; labId: string; instructor: boolean }) {
  const base = `/courses/${courseId}/labs/${labId}`;
  const rooms = [
    { to: `${base}/dashboard`, label: "Hand-ins" },
    { to: `${base}/extensions`, label: "Extensions" },
    { to: `${base}/comparison`, label: "Class comparison" },
    { to: `${base}/marking`, label: "Marking" },
    ...(instructor
      ? [
          { to: `${base}/moderation`, label: "Moderation" },
          { to: `${base}/edit`, label: "Settings" },
        ]
      : []),
  ];
  return (
    <nav aria-label="This lab" className="no-print mt-4 flex flex-wrap gap-1 border-b border-ink-900/10">
      {rooms.map((room) => (
        <NavLink
          key={room.to}
          to={room.to}
          className={({ isActive }) =>
            `-mb-px min-h-11 border-b-2 px-3 py-2.5 text-sm ${isActive ? "border-amber-500 font-medium text-ink-950" : "border-transparent text-ink-700 hover:border-ink-300"}`
          }
        >
          {room.label}
        </NavLink>
      ))}
    </nav>
  );
}
