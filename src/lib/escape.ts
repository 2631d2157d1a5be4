/**
 * The one escaping rule of the site for text and attribute values built into HTML or SVG strings:
 * & < > " ' become character references (HTML Living Standard, "Escaping a string"; the
 * apostrophe too, so a value is safe inside either quote). Every string-built fragment that holds
 * a value from content or a file passes through here; Astro's own `{value}` and `attr={value}`
 * escape in the same way.
 */
const REFS: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function esc(s: string | number): string {
  return String(s).replace(/[&<>"']/g, (c) => REFS[c]);
}
