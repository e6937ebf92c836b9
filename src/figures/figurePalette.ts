// The colours of every figure and of the report page around them. Series colours are
// muted, mutually distinct in hue and lightness so that they stay apart on screen, on
// paper and (mostly) for red-green colour-blind readers; chosen for tiercake, not taken
// from any plotting package. Colour maps of fields are in colorMaps.ts, phase colours in
// phasePalette.ts.

export const FIGURE_COLORS = {
  ink: '#1d2430',
  mutedInk: '#5b6472',
  rule: '#d5d9e0',
  grid: '#eceef2',
  background: '#ffffff',
  plotBackground: '#ffffff',
  marker: '#7b8391',
  /** Outline of legend swatches. */
  swatchEdge: '#80858f',
} as const;

/** Series colours in order of use. */
export const SERIES_COLORS: readonly string[] = [
  '#2a5a8c', // slate blue
  '#c2612c', // rust
  '#6d4f9c', // plum
  '#2d8585', // teal
  '#a83a4f', // brick
  '#7a7a26', // olive
  '#4a4f57', // graphite
];

const HEX_COLOR = /^#(?:[0-9a-fA-F]{3}|[0-9a-fA-F]{6})$/;

/** The caller's colour if it is a plain hex colour, else the palette colour for `index`. */
export function seriesColor(index: number, requested?: string): string {
  if (requested !== undefined && HEX_COLOR.test(requested)) return requested;
  return SERIES_COLORS[index % SERIES_COLORS.length]!;
}

/** An 8-bit sRGB colour. */
export type Rgb8 = readonly [number, number, number];

/** '#rrggbb' of an 8-bit sRGB triplet. */
export function hexColor(rgb: Rgb8): string {
  return `#${rgb.map((c) => Math.max(0, Math.min(255, Math.round(c))).toString(16).padStart(2, '0')).join('')}`;
}
