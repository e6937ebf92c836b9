// Escaping of plain text for HTML and SVG (XML 1.0, section 2.4 "Character Data and
// Markup"; HTML Living Standard, "Escaping a string"). The same five entities are valid
// in both languages, so one function serves text nodes and quoted attribute values.
// Characters that XML 1.0 forbids outright (C0 controls other than tab, newline and
// carriage return; lone surrogates; U+FFFE/U+FFFF) are replaced by U+FFFD so that a
// stray byte in a scenario name cannot make an inline SVG ill-formed.

const ENTITY: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

const FORBIDDEN = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

/** Plain text -> markup-safe text, for element content and for quoted attribute values. */
export function escapeMarkup(text: string): string {
  return String(text)
    .replace(FORBIDDEN, '\uFFFD')
    .replace(/[&<>"']/g, (ch) => ENTITY[ch]!);
}
