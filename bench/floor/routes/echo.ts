/** The floor's action: a resource route that reads a small JSON body and answers a small JSON one. */
import type { ActionFunctionArgs } from "react-router";

export async function action({ request }: ActionFunctionArgs) {
  const body = (await request.json()) as { n?: number };
  return Response.json({ ok: true, n: body.n ?? 0 }, { status: 201 });
}
