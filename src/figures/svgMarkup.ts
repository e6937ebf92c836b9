// Small pieces of SVG 1.1 markup (W3C Recommendation, 2011) shared by every figure: the
// root element, text, number formatting of coordinates and element ids. Output is
// well-formed XML, so a figure can be cut out of the report and opened on its own; all
// caller text goes through escapeMarkup.
//
// Element ids (clip paths, titles) must be unique within an HTML page that inlines many
// figures. A figure written without an explicit prefix takes its ids from a hash of its
// own markup (FNV-1a, 32 bit): two different figures get different ids, and two equal
// figures may share them harmlessly, since their definitions are identical.

import { escapeMarkup } from './escapeMarkup.js';
import { FIGURE_FONT_FAMILY } from './textMeasure.js';
import { FIGURE_COLORS } from './figurePalette.js';

/** Placeholder for the figure's id prefix inside markup under construction. */
export const ID = '\u0000id\u0000';

/** Coordinates rounded to 0.01 px, without trailing zeros. */
export function px(value: number): string {
  const rounded = Math.round(value * 100) / 100;
  return String(rounded === 0 ? 0 : rounded);
}

/** A caller's id prefix made safe for an XML id (letters first, no quotes). */
export function safeId(prefix: string): string {
  const cleaned = prefix.replace(/[^A-Za-z0-9_-]/g, '-');
  return /^[A-Za-z]/.test(cleaned) ? cleaned : `p-${cleaned}`;
}

function fnv1a(text: string): string {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0).toString(16).padStart(8, '0');
}

/** Replace the ID placeholder by `prefix`, or by a hash of the markup when none is given. */
export function resolveIds(markup: string, prefix?: string): string {
  const id = prefix !== undefined ? safeId(prefix) : `f${fnv1a(markup)}`;
  return markup.split(ID).join(id);
}

export interface SvgRoot {
  width: number;
  height: number;
  /** Accessible name (the figure title, or a description). */
  title: string;
  /** Extra class names besides tc-plot. */
  className?: string;
}

/** The opening of a figure: root element, title, white background. Close with '</svg>'. */
export function openSvg(root: SvgRoot): string[] {
  const w = px(root.width);
  const h = px(root.height);
  const cls = root.className ? `tc-plot ${root.className}` : 'tc-plot';
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="${cls}" id="${ID}" viewBox="0 0 ${w} ${h}" width="${w}" height="${h}" role="img" aria-labelledby="${ID}-title" font-family="${escapeMarkup(FIGURE_FONT_FAMILY)}">`,
    `<title id="${ID}-title">${escapeMarkup(root.title)}</title>`,
    `<rect class="background" x="0" y="0" width="${w}" height="${h}" fill="${FIGURE_COLORS.background}"/>`,
  ];
}

export type TextAnchor = 'start' | 'middle' | 'end';

export interface TextOptions {
  sizePx: number;
  anchor?: TextAnchor;
  color?: string;
  className?: string;
  /** Rotation in degrees about (x, y); -90 reads bottom to top. */
  rotateDeg?: number;
  /** Extra attributes, already escaped (e.g. data-*). */
  attributes?: string;
}

/** One line of text with its baseline at (x, y). */
export function svgText(text: string, x: number, y: number, o: TextOptions): string {
  const anchor = o.anchor && o.anchor !== 'start' ? ` text-anchor="${o.anchor}"` : '';
  const cls = o.className ? ` class="${o.className}"` : '';
  const extra = o.attributes ? ` ${o.attributes}` : '';
  const place = o.rotateDeg ? `transform="translate(${px(x)} ${px(y)}) rotate(${o.rotateDeg})"` : `x="${px(x)}" y="${px(y)}"`;
  return `<text${cls} ${place}${anchor} font-size="${px(o.sizePx)}" fill="${o.color ?? FIGURE_COLORS.ink}"${extra}>${escapeMarkup(text)}</text>`;
}

/** A rectangular clip path with id `${ID}-${name}`. */
export function clipRect(name: string, x: number, y: number, width: number, height: number): string {
  return `<clipPath id="${ID}-${name}"><rect x="${px(x)}" y="${px(y)}" width="${px(width)}" height="${px(height)}"/></clipPath>`;
}
