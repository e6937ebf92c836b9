// Reading figures back in tests: attributes of SVG elements, each <text> element's ink box
// as resvg draws it with the figure font (an independent measurement of the layout), and
// pixels of the rendered PNG decoded by pngjs.

import { Resvg } from '@resvg/resvg-js';
import { PNG } from 'pngjs';
import { figureFontFile, svgToPng } from '../../src/figures/svgToPng.js';

export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** Numeric attributes of the first element matching `tag` and `cls` (class attribute). */
export function elementBox(svg: string, tag: string, cls: string): Box {
  const m = new RegExp(`<${tag} class="${cls}"[^>]*>`).exec(svg);
  if (!m) throw new Error(`no <${tag} class="${cls}"> in the figure`);
  const attr = (name: string): number => Number(new RegExp(`\\s${name}="([^"]+)"`).exec(m[0])?.[1]);
  return { x: attr('x'), y: attr('y'), width: attr('width'), height: attr('height') };
}

export function rootSize(svg: string): { width: number; height: number } {
  const root = /^<svg\b[^>]*>/.exec(svg)![0];
  return { width: Number(/\swidth="([\d.]+)"/.exec(root)![1]), height: Number(/\sheight="([\d.]+)"/.exec(root)![1]) };
}

/** Every <text> element of the figure (outer markup). */
export function textElements(svg: string): string[] {
  return [...svg.matchAll(/<text\b[^>]*>[^<]*<\/text>/g)].map((m) => m[0]);
}

/** Text content of the <text> elements, unescaped. */
export function texts(svg: string): string[] {
  return textElements(svg).map((t) =>
    t
      .replace(/^<text\b[^>]*>/, '')
      .replace(/<\/text>$/, '')
      .replace(/&lt;/g, '<')
      .replace(/&gt;/g, '>')
      .replace(/&quot;/g, '"')
      .replace(/&#39;/g, "'")
      .replace(/&amp;/g, '&'),
  );
}

const font = { fontFiles: [figureFontFile()], loadSystemFonts: false, defaultFontFamily: 'DejaVu Sans' };

/**
 * The ink box of one text element as resvg lays it out, in the figure's coordinates:
 * the element alone in a root of the same size (its font-family inherited as in the figure).
 */
export function inkBox(svg: string, textElement: string): Box | null {
  const { width, height } = rootSize(svg);
  const family = /font-family="([^"]+)"/.exec(svg)?.[1] ?? 'DejaVu Sans';
  const doc = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" font-family="${family}">${textElement}</svg>`;
  const b = new Resvg(doc, { font }).getBBox();
  return b ? { x: b.x, y: b.y, width: b.width, height: b.height } : null;
}

export interface Pixels {
  width: number;
  height: number;
  at(x: number, y: number): [number, number, number];
}

export function decode(png: Uint8Array): Pixels {
  const p = PNG.sync.read(Buffer.from(png));
  return {
    width: p.width,
    height: p.height,
    at: (x, y) => {
      const i = (Math.floor(y) * p.width + Math.floor(x)) * 4;
      return [p.data[i]!, p.data[i + 1]!, p.data[i + 2]!];
    },
  };
}

export function renderPixels(svg: string): Pixels {
  return decode(svgToPng(svg));
}
