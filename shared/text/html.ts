const ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', '\'': '&#39;' }

/** Text safe inside HTML element content and quoted attribute values: & < > " ' as entities. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, c => ENTITIES[c]!)
}
