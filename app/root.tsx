import type { ReactNode } from "react";
import { Links, Meta, Outlet, Scripts, ScrollRestoration, isRouteErrorResponse, useRouteLoaderData } from "react-router";
import type { Route } from "./+types/root";
import { AppShell } from "~/components/app-shell";
import { CROSS_ORIGIN_REFUSAL } from "~/lib/auth/cross-origin";
import { useNonce } from "~/components/nonce";
import { requestGuard } from "~/server/auth/request-guard.server";
import { bodyLimitGuard } from "~/server/body-limits.server";
import { databaseOutageGuard } from "~/server/database-outage.server";
import { getShellViewer } from "~/server/shell.server";
import "./app.css";

// Runs around every loader and action, resource routes included: the 503 when the database is
// unreachable (outermost, so it also covers the session check), the 413 for an oversized body, then
// the CSRF check and session cookie upkeep.
export const middleware: Route.MiddlewareFunction[] = [databaseOutageGuard, bodyLimitGuard, requestGuard];

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  return { viewer: await getShellViewer({ request, context }) };
}

export function Layout({ children }: { children: ReactNode }) {
  const nonce = useNonce();
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body>
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

export default function App({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell viewer={loaderData.viewer}>
      <Outlet />
    </AppShell>
  );
}

export function meta() {
  return [{ title: "Benchpost" }];
}

/** What each status means for the person who hit it, and what they can do next. */
const explanations: Record<number, { title: string; advice: string }> = {
  400: { title: "That request could not be understood", advice: "Go back, check what you entered and try again." },
  403: {
    title: "This page is not open to you",
    advice:
      "You are signed in with an account that has no role here. Sign in with another account, or ask the course's instructor to add you.",
  },
  404: { title: "There is nothing at this address", advice: "The link may be old or mistyped. Start again from the overview." },
  413: {
    title: "That was too much to send at once",
    advice: "Nothing was stored. Send less in one go, for example a smaller file split in two.",
  },
  429: { title: "Too many attempts", advice: "Wait a little, then try again." },
  503: {
    title: "Benchpost cannot reach its database just now",
    advice: "Nothing from this request was stored, and nothing you handed in before is lost. Wait a minute, then try again.",
  },
  500: {
    title: "Something went wrong on our side",
    advice: "Nothing you handed in is lost. Try again in a moment; if it keeps happening, tell your instructor.",
  },
};

const crossOriginExplanation = {
  title: "That form came from another site",
  advice:
    "Benchpost takes changes only from its own pages, so nothing was changed. Open the page in Benchpost and send the form from there.",
};

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const rootData = useRouteLoaderData<typeof loader>("root");
  const status = isRouteErrorResponse(error) ? error.status : 500;
  const crossOrigin = isRouteErrorResponse(error) && error.data === CROSS_ORIGIN_REFUSAL;
  const { title, advice } = crossOrigin ? crossOriginExplanation : (explanations[status] ?? explanations[500]);
  const detail = import.meta.env.DEV && error instanceof Error ? error.stack : undefined;
  return (
    <AppShell viewer={rootData?.viewer ?? null}>
      <title>{`${title} · Benchpost`}</title>
      <section className="mx-auto max-w-xl py-12" aria-labelledby="error-title">
        <p className="text-sm font-medium text-amber-700">Error {status}</p>
        <h1 id="error-title" className="mt-2 text-2xl font-semibold">
          {title}
        </h1>
        <p className="mt-3 text-ink-700">{advice}</p>
        <p className="mt-6 flex gap-3">
          <a href="/" className="rounded bg-ink-800 px-4 py-2 text-paper-50">
            Go to the overview
          </a>
          {status === 403 && !crossOrigin ? (
            <a href="/sign-in" className="rounded px-4 py-2 ring-1 ring-ink-800">
              Sign in with another account
            </a>
          ) : null}
        </p>
        {detail ? <pre className="mt-8 overflow-auto rounded bg-ink-950 p-4 text-xs text-paper-100">{detail}</pre> : null}
      </section>
    </AppShell>
  );
}
