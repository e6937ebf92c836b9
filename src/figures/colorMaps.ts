// Colour maps for scalar fields, ordered by perceived lightness.
//
// Sequential maps follow D. A. Green, "A colour scheme for the display of astronomical
// intensity images", Bull. Astr. Soc. India 39, 289 (2011) ("cubehelix"). For a fraction
// lambda in [0, 1], start colour s, rotations r, hue amplitude h and gamma:
//   phi = 2 pi (s/3 + r lambda),   a = h lambda^gamma (1 - lambda^gamma) / 2,
//   R = lambda^gamma + a (-0.14861 cos phi + 1.78277 sin phi)
//   G = lambda^gamma + a (-0.29227 cos phi - 0.90649 sin phi)
//   B = lambda^gamma + a ( 1.97294 cos phi)
// The two direction vectors are chosen in the paper so that the deviation from the grey
// diagonal has zero brightness in the weighting 0.30 R + 0.59 G + 0.11 B; the perceived
// brightness therefore grows with lambda^gamma. Our maps use their own parameters and a
// sub-range [lambdaLow, lambdaHigh] of the helix, so that the bright end keeps a tint and
// does not vanish into a white page. Every map is checked in the tests to have strictly
// increasing CIE L* (see cieLab.ts).
//
// The diverging map for residuals is built directly in CIE L*a*b* (CIE 15:2004): two hue
// angles of our own, L* falling linearly and symmetrically from a light neutral centre
// to the same L* at both ends, chroma growing with distance from the centre and reduced
// where needed to stay inside the sRGB gamut (IEC 61966-2-1) at unchanged L*.

import { labToSrgb, labWithinGamut, type Rgb } from './cieLab.js';

export type { Rgb } from './cieLab.js';

/** Parameters of Green's cubehelix (start colour, rotations, hue amplitude, gamma). */
export interface CubehelixParams {
  /** Start colour: 1 = red, 2 = green, 3 = blue (Green's convention); 0.5 is purple. */
  start: number;
  /** Number of turns of the helix from lambda = 0 to 1 (negative: red to blue direction). */
  rotations: number;
  /** Amplitude of the deviation from grey; 0 gives a pure grey ramp. */
  hue: number;
  /** Exponent applied to lambda for the brightness; 1 keeps it linear. */
  gamma: number;
}

/**
 * Green's cubehelix colour at fraction `lambda` in [0, 1], before clipping: the three
 * components can leave [0, 1] for large `hue`. Use `cubehelixRgb` for a displayable colour.
 */
export function cubehelixUnclipped(lambda: number, params: CubehelixParams): Rgb {
  const phi = 2 * Math.PI * (params.start / 3 + params.rotations * lambda);
  const lg = lambda ** params.gamma;
  const amp = (params.hue * lg * (1 - lg)) / 2;
  const c = Math.cos(phi);
  const s = Math.sin(phi);
  return [
    lg + amp * (-0.14861 * c + 1.78277 * s),
    lg + amp * (-0.29227 * c - 0.90649 * s),
    lg + amp * (1.97294 * c),
  ];
}

/** Cubehelix colour at `lambda`, each component clipped to [0, 1] as in Green's paper. */
export function cubehelixRgb(lambda: number, params: CubehelixParams): Rgb {
  const u = cubehelixUnclipped(lambda, params);
  return [clamp01(u[0]), clamp01(u[1]), clamp01(u[2])];
}

interface HelixMap {
  kind: 'helix';
  params: CubehelixParams;
  lambdaLow: number;
  lambdaHigh: number;
  description: string;
}

interface DivergingMap {
  kind: 'diverging';
  /** Hue angles (degrees from +a* towards +b*) of the low and high ends. */
  lowHueDeg: number;
  highHueDeg: number;
  centreLightness: number;
  endLightness: number;
  maxChroma: number;
  description: string;
}

// Our own parameter choices, tuned by eye on a white page and checked for monotone L*.
const mapDefinitions = {
  ember: {
    kind: 'helix',
    params: { start: 0.7, rotations: 0.33, hue: 1.5, gamma: 1 },
    lambdaLow: 0.03,
    lambdaHigh: 0.93,
    description: 'sequential, near-black through crimson and amber to pale straw (default for densities)',
  },
  glacier: {
    kind: 'helix',
    params: { start: 3.3, rotations: -0.4, hue: 1.2, gamma: 1 },
    lambdaLow: 0.03,
    lambdaHigh: 0.94,
    description: 'sequential, deep navy through teal to pale ice',
  },
  dusk: {
    kind: 'helix',
    params: { start: 0.4, rotations: -1.1, hue: 1.0, gamma: 1 },
    lambdaLow: 0.02,
    lambdaHigh: 0.95,
    description: 'sequential, several hues (violet, sea blue, olive, rose) for fine contrast',
  },
  ash: {
    kind: 'helix',
    params: { start: 0, rotations: 0, hue: 0, gamma: 1 },
    lambdaLow: 0,
    lambdaHigh: 1,
    description: 'sequential grey ramp from black to white, for print',
  },
  rift: {
    kind: 'diverging',
    lowHueDeg: 282,
    highHueDeg: 38,
    centreLightness: 96,
    endLightness: 34,
    maxChroma: 56,
    description: 'diverging for residuals: blue below, light neutral at the centre, brick red above',
  },
} as const satisfies Record<string, HelixMap | DivergingMap>;

/** Names of the available colour maps. */
export type ColorMapName = keyof typeof mapDefinitions;

/** All colour map names, for option validation and documentation. */
export const colorMapNames = Object.keys(mapDefinitions) as ColorMapName[];

/** One-line description of each colour map, for help texts and the report. */
export function colorMapDescription(name: ColorMapName): string {
  return mapDefinitions[name].description;
}

/** Whether a map is diverging (meant for a range symmetric about zero). */
export function isDivergingColorMap(name: ColorMapName): boolean {
  return mapDefinitions[name].kind === 'diverging';
}

/** Colour shown for a missing value (NaN): a neutral mid grey. */
export const missingValueRgb: Rgb = [0.6, 0.6, 0.6];

function clamp01(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}

function checkName(name: string): ColorMapName {
  if (!(name in mapDefinitions)) {
    throw new Error(`colour map '${name}' is unknown; choose one of: ${colorMapNames.join(', ')}`);
  }
  return name as ColorMapName;
}

function divergingRgb(t: number, map: DivergingMap): Rgb {
  // s = 0 at the centre, 1 at either end; both halves share the same L*(s).
  const s = Math.abs(2 * t - 1);
  const lightness = map.centreLightness - (map.centreLightness - map.endLightness) * s;
  // Chroma rises a little faster than linearly away from the centre, so small residuals
  // are already tinted; sqrt-like growth would wash out the neutral centre too quickly.
  const chroma = map.maxChroma * Math.sin((Math.PI / 2) * s) ** 1.2;
  const hue = t < 0.5 ? map.lowHueDeg : map.highHueDeg;
  return labToSrgb(labWithinGamut(lightness, chroma, hue));
}

/**
 * The colour map `name` as a function of t in [0, 1] (values outside are clamped, NaN
 * gives `missingValueRgb`), returning encoded sRGB components in [0, 1].
 */
export function colorMapLookup(name: string): (t: number) => Rgb {
  const map: HelixMap | DivergingMap = mapDefinitions[checkName(name)];
  if (map.kind === 'diverging') {
    return (t) => (Number.isNaN(t) ? missingValueRgb : divergingRgb(clamp01(t), map));
  }
  return (t) => {
    if (Number.isNaN(t)) return missingValueRgb;
    const lambda = map.lambdaLow + (map.lambdaHigh - map.lambdaLow) * clamp01(t);
    return cubehelixRgb(lambda, map.params);
  };
}

/**
 * A lookup table of `entries` colours (default 256) as 8-bit sRGB triplets
 * [r0, g0, b0, r1, g1, b1, ...]; entry k holds the colour at t = k / (entries - 1).
 */
export function buildColorTable(name: string, entries = 256): Uint8Array {
  if (!Number.isInteger(entries) || entries < 2) {
    throw new Error(`colour table size: expected an integer >= 2, got ${entries}`);
  }
  const lookup = colorMapLookup(name);
  const table = new Uint8Array(entries * 3);
  for (let k = 0; k < entries; k++) {
    const rgb = lookup(k / (entries - 1));
    table[3 * k] = Math.round(255 * rgb[0]);
    table[3 * k + 1] = Math.round(255 * rgb[1]);
    table[3 * k + 2] = Math.round(255 * rgb[2]);
  }
  return table;
}
