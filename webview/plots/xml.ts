/** Text and attribute values for SVG documents built as strings. */

/** Escapes every character that could end an attribute value or start markup. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c] as string);
}
