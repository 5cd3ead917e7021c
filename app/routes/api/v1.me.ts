import type { Route } from "./+types/v1.me";
import { requireApiUser } from "~/server/auth/access.server";
import { methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { getShellViewer } from "~/server/shell.server";

/** Who the caller is and their courses: the smallest useful check that a token or session works. */
export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireApiUser({ request, context });
  const viewer = await getShellViewer({ request, context });
  return Response.json(
    { user: { id: user.id, name: user.name, email: user.email }, courses: viewer?.courses ?? [], authenticatedWith: user.via },
    { headers: { "Cache-Control": "no-store" } },
  );
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
