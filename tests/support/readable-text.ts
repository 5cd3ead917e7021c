/** Rendered HTML as a reader sees its words: tags dropped, the entities React and e-mail renderers write decoded, spaces collapsed. */
export function readableText(html: string): string {
  return html
    .replace(/<[^>]+>/g, "")
    .replace(/&#x27;|&#39;/g, "'")
    .replace(/&quot;/g, '"')
    .replace(/&amp;/g, "&")
    .replace(/\s+/g, " ");
}
