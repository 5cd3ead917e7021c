/**
 * Where a server-rendered page's bytes go: the whole document, and the part of it that is React
 * Router's hydration payload (the turbo-stream of the loader data, enqueued by inline `<script>` tags),
 * so that a page's weight is told apart from the data it sends twice.
 */
export type DocumentWeight = { total: number; hydration: number };

export function documentWeight(html: string): DocumentWeight {
  const bytes = (text: string) => Buffer.byteLength(text, "utf8");
  let hydration = 0;
  for (const [script] of html.matchAll(/<script\b[^>]*>[\s\S]*?<\/script>/g))
    if (script.includes("streamController") || script.includes("__reactRouterContext")) hydration += bytes(script);
  return { total: bytes(html), hydration };
}
