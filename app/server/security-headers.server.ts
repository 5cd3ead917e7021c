/**
 * Security headers of every HTML page. Scripts run only from our origin or with the response's nonce;
 * nothing may frame us, and we frame nothing but our own (srcdoc) previews.
 */
import { appUrl, isProduction } from "~/server/config.server";

export function contentSecurityPolicy(nonce: string, { development = !isProduction() } = {}): string {
  const directives: Record<string, string[]> = {
    "default-src": ["'self'"],
    "script-src": ["'self'", `'nonce-${nonce}'`],
    // Inline styles: React style attributes, Vite's injected CSS in development, and the inline styles
    // of e-mails previewed in the dev inbox's srcdoc iframe (which inherits this policy).
    "style-src": ["'self'", "'unsafe-inline'"],
    "img-src": ["'self'", "data:", "blob:"],
    "font-src": ["'self'"],
    // Vite's hot reload talks over a WebSocket to the dev server.
    "connect-src": development ? ["'self'", "ws:", "wss:"] : ["'self'"],
    "frame-src": ["'self'"],
    "child-src": ["'self'"],
    "form-action": ["'self'"],
    "object-src": ["'none'"],
    "base-uri": ["'none'"],
    "frame-ancestors": ["'none'"],
  };
  return Object.entries(directives)
    .map(([name, values]) => `${name} ${values.join(" ")}`)
    .join("; ");
}

export function setDocumentSecurityHeaders(headers: Headers, nonce: string): void {
  headers.set("Content-Security-Policy", contentSecurityPolicy(nonce));
  headers.set("X-Content-Type-Options", "nosniff");
  headers.set("X-Frame-Options", "DENY");
  // A page that carries a token in its address (reset, invitation, sign-in link) asks for `strict-origin` itself.
  if (!headers.has("Referrer-Policy")) headers.set("Referrer-Policy", "strict-origin-when-cross-origin");
  headers.set("Permissions-Policy", "camera=(self), geolocation=(), microphone=()");
}

/**
 * HSTS whenever the app's public address is HTTPS, as it is in production: browsers then refuse plain
 * HTTP to it for a year (RFC 6797; one year is the common practice for a site that stays on HTTPS).
 * Never for the demo on http://localhost, where browsers would ignore it anyway.
 */
export function strictTransportSecurity(): string | null {
  return appUrl().startsWith("https://") ? "max-age=31536000; includeSubDomains" : null;
}
