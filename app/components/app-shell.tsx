import { roleWords } from "~/lib/courses/roles";
import type { ReactNode } from "react";
import { Form, Link, NavLink } from "react-router";
import { BenchpostMark } from "./benchpost-mark";

export type ViewerRole = "instructor" | "ta" | "student";

/** What the shell needs to know about the person looking at the page. */
export type ShellViewer = {
  name: string;
  email: string;
  /** An instructor account, which may open new courses. */
  mayCreateCourses: boolean;
  /** `archived`: a finished course, kept out of the navigation and listed apart on the home page. */
  courses: { id: string; code: string; title: string; term: string; role: ViewerRole; archived: boolean }[];
};

export type NavItem = { to: string; label: string };

/**
 * The navigation a viewer gets: each course they belong to, with the rooms their role opens there.
 * Staff get the course's working rooms; students get their own lab work and kit.
 */
export function navigationFor(viewer: ShellViewer | null): NavItem[] {
  if (!viewer) return [{ to: "/sign-in", label: "Sign in" }];
  return [
    { to: "/", label: "Overview" },
    ...viewer.courses.filter((course) => !course.archived).map((course) => ({ to: `/courses/${course.id}`, label: course.code })),
    { to: "/account", label: "Account" },
  ];
}

export function AppShell({ viewer, children }: { viewer: ShellViewer | null; children: ReactNode }) {
  const items = navigationFor(viewer);
  return (
    <div className="flex min-h-dvh flex-col">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:rounded focus:bg-paper-50 focus:px-3 focus:py-2"
      >
        Skip to content
      </a>
      <header className="no-print border-b border-ink-900/10 bg-ink-800 text-paper-50">
        <div className="mx-auto flex max-w-6xl items-center gap-4 px-4 py-3">
          <Link to="/" className="flex items-center gap-2 font-semibold tracking-tight">
            <BenchpostMark />
            <span className="text-lg">Benchpost</span>
          </Link>
          <nav aria-label="Main" className="ml-auto">
            <details className="group relative sm:hidden">
              <summary className="cursor-pointer list-none rounded px-3 py-1.5 ring-1 ring-paper-50/30">Menu</summary>
              <ul className="absolute right-0 z-10 mt-2 w-56 rounded-lg bg-ink-900 p-2 shadow-lg">
                {items.map((item) => (
                  <li key={item.to}>
                    <ShellLink item={item} />
                  </li>
                ))}
                {viewer ? (
                  <li className="mt-1 border-t border-paper-50/20 pt-1">
                    <SignOutButton />
                  </li>
                ) : null}
              </ul>
            </details>
            <ul className="hidden items-center gap-1 sm:flex">
              {items.map((item) => (
                <li key={item.to}>
                  <ShellLink item={item} />
                </li>
              ))}
              {viewer ? (
                <li>
                  <SignOutButton />
                </li>
              ) : null}
            </ul>
          </nav>
          {viewer ? (
            <p className="hidden text-sm text-paper-200 md:block" title={viewer.email}>
              {viewer.name}
              {viewer.courses.length === 1 ? ` · ${roleWords[viewer.courses[0].role]}` : null}
            </p>
          ) : null}
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-6xl flex-1 px-4 py-6">
        {children}
      </main>
      <footer className="no-print border-t border-ink-900/10 px-4 py-4 text-center text-xs text-ink-600">
        Benchpost — lab courses done at home, with kits sent by post.
      </footer>
    </div>
  );
}

/** Ends this device's session (a POST, as every change is); "everywhere" stays on the sign-out and account pages. */
function SignOutButton() {
  return (
    <Form method="post" action="/sign-out">
      <button
        type="submit"
        name="intent"
        value="this-device"
        className="block w-full rounded px-3 py-1.5 text-left text-sm text-paper-50 ring-1 ring-paper-50/30 hover:bg-ink-700"
      >
        Sign out
      </button>
    </Form>
  );
}

function ShellLink({ item }: { item: NavItem }) {
  return (
    <NavLink
      to={item.to}
      end={item.to === "/"}
      className={({ isActive }) =>
        `block rounded px-3 py-1.5 text-sm ${isActive ? "bg-paper-50 text-ink-900" : "text-paper-50 hover:bg-ink-700"}`
      }
    >
      {item.label}
    </NavLink>
  );
}
