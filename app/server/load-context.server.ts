/**
 * What our web server (scripts/web.ts) tells loaders and actions beyond the Request: the address of
 * the TCP peer, which a Request does not carry. Loaders read it as `context.remoteAddress`.
 *
 * With middleware on (react-router.config.ts), `context` is a RouterContextProvider; the server's
 * fields are set on that instance and declared here by augmenting AppLoadContext, which the provider
 * then extends. Anything that calls the app without our server (Vite's own handler, a test's
 * in-process request) gives no address, and whatever depends on one stays closed.
 */
import { BlockList, isIP } from "node:net";
import { RouterContextProvider } from "react-router";

declare module "react-router" {
  interface AppLoadContext {
    /** The socket's remote address as Node reports it ("127.0.0.1", "::1", "::ffff:10.0.0.5"); unset when unknown. */
    remoteAddress?: string;
    /** The id our web server gave the request (also its X-Request-Id response header), for the logs. */
    requestId?: string;
  }
  // eslint-disable-next-line @typescript-eslint/no-empty-object-type -- merges our fields into the provider's type
  interface RouterContextProvider extends AppLoadContext {}
}

export function loadContextFor(remoteAddress: string | undefined, requestId?: string): RouterContextProvider {
  return Object.assign(new RouterContextProvider(), { remoteAddress, requestId });
}

const loopback = new BlockList();
loopback.addSubnet("127.0.0.0", 8, "ipv4");
loopback.addAddress("::1", "ipv6");

/** 127.0.0.0/8, ::1, and IPv4-mapped 127.x (::ffff:127.0.0.1, as a dual-stack socket reports it). */
export function isLoopbackAddress(address: string | undefined): boolean {
  const family = address ? isIP(address) : 0;
  if (!address || !family) return false;
  return loopback.check(address, family === 4 ? "ipv4" : "ipv6");
}
