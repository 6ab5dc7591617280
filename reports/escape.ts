// Escaping for everything the report writes into HTML: text, attributes and inline script data.

const HTML_ENTITIES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/** Escape text for an HTML text node or a quoted attribute value. */
export function escapeHtml(text: unknown): string {
  return String(text).replace(/[&<>"']/g, (c) => HTML_ENTITIES[c]!);
}

/**
 * Text for plotly labels (legend names, hover templates, axis titles). plotly reads a small subset of
 * HTML in these strings and decodes only a few named entities (not &quot;) but any numeric one, so
 * markup characters go out as numeric entities: shown as typed, never parsed as tags.
 */
export function plotlyText(text: unknown): string {
  return String(text).replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/**
 * JSON for a `<script type="application/json">` block. `<`, `>`, `&` and the two JavaScript line
 * separators are written as \u escapes so no string in the data can close the script element.
 */
export function jsonForScript(value: unknown): string {
  return JSON.stringify(value, finiteOrNull)
    .replace(/</g, '\\u003c')
    .replace(/>/g, '\\u003e')
    .replace(/&/g, '\\u0026')
    .replace(/\u2028/g, '\\u2028')
    .replace(/\u2029/g, '\\u2029');
}

/**
 * Inline JavaScript source (the plotting library): a literal `</script` inside it would end the
 * element early, so it is broken up; `<!--` is neutralised for the same reason.
 */
export function scriptSource(source: string): string {
  return source.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\!--');
}

// JSON has no NaN/Infinity; plotly reads null as a gap, which is the honest rendering of a missing value.
function finiteOrNull(_key: string, value: unknown): unknown {
  return typeof value === 'number' && !Number.isFinite(value) ? null : value;
}
