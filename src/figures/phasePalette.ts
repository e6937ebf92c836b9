// Site-phase codes and the colours of phase maps.
//
// The solver labels every site with one of the codes below; Mott sites carry their
// integer filling in a separate array. The colours are our own choice, picked in
// CIE L*a*b* (CIE 15:2004) and rounded to 8-bit sRGB (IEC 61966-2-1):
//   empty         L* 95.6, chroma  3 : a faint warm paper tone, so empty sites read as "nothing"
//   superfluid    L* 70,   chroma 62, hue  68 deg : amber (deliberately not green)
//   Bose glass    L* 50,   chroma 55, hue 355 deg : raspberry
//   normal fluid  L* 68,   chroma 16, hue  62 deg : warm taupe, a "washed out" superfluid tone
//   Mott n = 1..6 hue 280 deg (blue), L* = 82, 69, 56, 43, 30, 17 with chroma 22..44:
//                 darker means more atoms per site, so the shells of a wedding-cake profile
//                 read as steps of one lightness scale.
// Every pair differs by CIE 1976 Delta E*ab > 13 (checked in the tests). Fillings above 6
// share the darkest shade; the legend says so.

import { PhaseCode as PhaseCodes, phaseTitles, type PhaseCodeValue } from '../observables/phaseCodes.js';

/** Site phase codes written by the solver (one byte per site); defined in observables/phaseCodes.ts. */
export const PhaseCode = PhaseCodes;
export type PhaseCode = PhaseCodeValue;

import type { Rgb8 } from './figurePalette.js';

/** The number of distinct Mott shades; larger fillings reuse the last one. */
export const mottShadeCount = 6;

/** The colours of the phase map. */
export const phasePalette = {
  empty: [0xf5, 0xf2, 0xec],
  superfluid: [0xeb, 0x99, 0x3f],
  boseGlass: [0xc6, 0x49, 0x81],
  normalFluid: [0xbd, 0xa0, 0x8d],
  /** mottShells[n - 1] is the colour of a Mott site with filling n (n = 1..6). */
  mottShells: [
    [0xbd, 0xcb, 0xf4],
    [0x92, 0xa8, 0xde],
    [0x65, 0x86, 0xc7],
    [0x33, 0x66, 0xad],
    [0x00, 0x47, 0x87],
    [0x00, 0x2a, 0x54],
  ],
} as const satisfies {
  empty: Rgb8;
  superfluid: Rgb8;
  boseGlass: Rgb8;
  normalFluid: Rgb8;
  mottShells: readonly Rgb8[];
};

/**
 * Names of the phases for legends, by code: the same words as the report's tables
 * (phaseTitles in observables/phaseCodes.ts), so a legend and a table never disagree.
 */
export const phaseNames: Record<PhaseCode, string> = {
  [PhaseCode.empty]: phaseTitles.empty,
  [PhaseCode.superfluid]: phaseTitles.superfluid,
  [PhaseCode.mott]: phaseTitles.mott,
  [PhaseCode.boseGlass]: phaseTitles.boseGlass,
  [PhaseCode.normalFluid]: phaseTitles.normalFluid,
};

/** Whether `code` is one of the PhaseCode values. */
export function isPhaseCode(code: number): code is PhaseCode {
  return Number.isInteger(code) && code >= 0 && code <= 4;
}

/** Colour of a Mott site with integer filling `filling` >= 1. */
export function mottShellColor(filling: number): Rgb8 {
  if (!Number.isInteger(filling) || filling < 1) {
    throw new Error(`Mott filling: expected an integer >= 1, got ${filling}`);
  }
  return phasePalette.mottShells[Math.min(filling, mottShadeCount) - 1];
}

/**
 * Colour of a site with phase `code`; `filling` is only read for Mott sites.
 * Throws for an unknown code, naming it.
 */
export function phaseColor(code: number, filling: number): Rgb8 {
  switch (code) {
    case PhaseCode.empty:
      return phasePalette.empty;
    case PhaseCode.superfluid:
      return phasePalette.superfluid;
    case PhaseCode.mott:
      return mottShellColor(filling);
    case PhaseCode.boseGlass:
      return phasePalette.boseGlass;
    case PhaseCode.normalFluid:
      return phasePalette.normalFluid;
    default:
      throw new Error(`phase code ${code} is unknown; expected 0..4 (see PhaseCode)`);
  }
}

/** Legend text of a phase, e.g. 'Mott insulator, n = 2' or 'Mott insulator, n >= 6'. */
export function phaseLabel(code: PhaseCode, filling: number): string {
  if (code !== PhaseCode.mott) return phaseNames[code];
  return filling >= mottShadeCount ? `Mott insulator, n \u2265 ${mottShadeCount}` : `Mott insulator, n = ${filling}`;
}
