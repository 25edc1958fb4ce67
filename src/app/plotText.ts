/**
 * Plotly reads a subset of HTML in titles, axis labels, annotations and legend names (<b>, <i>, <a>,
 * <br>, <sub>, …). Text that comes from files (quantity names, units, titles, candidate names) must show
 * as typed, never as markup, so every such string is escaped on its way into a figure. Plotly decodes
 * the entities &lt; &gt; &amp; back to the characters when it renders the label.
 * Hover templates are ours (they carry %{…} placeholders and <br>) and are left alone.
 */

/** `s` with &, < and > replaced by their entities. */
export function escapePlotText(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

/** The keys whose string values plotly renders as rich text. */
const RICH_TEXT_KEYS = new Set(['text', 'name', 'ticktext']);

/**
 * A copy of a layout or trace object in which every string under a rich-text key (`text`, `name`,
 * `ticktext`, at any depth, including arrays of strings) is escaped. Typed arrays and numbers pass through.
 */
export function plotSafe<T>(value: T, key = ''): T {
  if (typeof value === 'string') return (RICH_TEXT_KEYS.has(key) ? escapePlotText(value) : value) as T;
  if (value === null || typeof value !== 'object' || ArrayBuffer.isView(value)) return value;
  if (Array.isArray(value)) return value.map((v) => plotSafe(v, key)) as T;
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) out[k] = plotSafe(v, k);
  return out as T;
}
