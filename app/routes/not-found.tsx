import { data } from "react-router";

/** Any URL no other route claims: answered with a real 404 that the root error page explains. */
export function loader() {
  throw data("Not found", { status: 404 });
}

export default function NotFound() {
  return null;
}
