import type { ShellViewer } from "~/components/app-shell";

/**
 * The signed-in person and their courses, for the navigation. Sessions arrive with accounts and
 * sign-in; until then every visitor is anonymous.
 */
export async function getShellViewer(_request: Request): Promise<ShellViewer | null> {
  return null;
}
