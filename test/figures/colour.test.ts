// Colour maps and the phase palette, checked with colour science the test computes itself:
//   - sRGB decoding, IEC 61966-2-1:1999: V <= 0.04045 ? V/12.92 : ((V + 0.055)/1.055)^2.4;
//     relative luminance Y = 0.2126 R + 0.7152 G + 0.0722 B (linear components);
//     X and Z rows 0.4124 0.3576 0.1805 / 0.0193 0.1192 0.9505 of the same standard.
//   - CIE 1976 L*a*b*, CIE 15:2004 section 8.2.1 (f(t) = cbrt(t) above (6/29)^3, linear below).
//   - Cubehelix: D. A. Green, Bull. Astr. Soc. India 39, 289 (2011), equations for
//     phi = 2 pi (s/3 + r lambda), a = h lambda^g (1 - lambda^g)/2 and the matrix
//     (-0.14861, 1.78277; -0.29227, -0.90649; 1.97294, 0).

import { describe, expect, it } from 'vitest';
import { deltaE76, labToSrgb, srgbToLab } from '../../src/figures/cieLab.js';
import {
  buildColorTable,
  colorMapLookup,
  colorMapNames,
  cubehelixRgb,
  cubehelixUnclipped,
  isDivergingColorMap,
} from '../../src/figures/colorMaps.js';
import { isPhaseCode, mottShellColor, phaseColor, PhaseCode, phaseLabel, phasePalette } from '../../src/figures/phasePalette.js';

// ---- The test's own colour science (independent of src/imaging/cieLab.ts) ----
function decode(v: number): number {
  return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
}
function f(t: number): number {
  return t > (6 / 29) ** 3 ? Math.cbrt(t) : t / (3 * (6 / 29) ** 2) + 4 / 29;
}
function lab(rgb: readonly number[]): { L: number; a: number; b: number } {
  const [r, g, b] = rgb.map(decode);
  const X = 0.4124 * r + 0.3576 * g + 0.1805 * b;
  const Y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  const Z = 0.0193 * r + 0.1192 * g + 0.9505 * b;
  const [Xn, Yn, Zn] = [0.9505, 1.0, 1.089]; // D65 white = row sums of the matrix above
  return { L: 116 * f(Y / Yn) - 16, a: 500 * (f(X / Xn) - f(Y / Yn)), b: 200 * (f(Y / Yn) - f(Z / Zn)) };
}
const lightness = (rgb: readonly number[]): number => lab(rgb).L;
const lab8 = (rgb: readonly number[]) => lab(rgb.map((c) => c / 255));

describe('CIE L*a*b* conversion (src/imaging/cieLab.ts)', () => {
  it('matches published L*a*b* of the sRGB primaries', () => {
    // Reference values (recalled from memory; the widely tabulated D65 values, e.g. B.
    // Lindbloom's colour calculator): red (53.2408, 80.0925, 67.2032), green (87.7347,
    // -86.1827, 83.1793), blue (32.2970, 79.1875, -107.8602). Tolerance 0.1: those tables
    // use unrounded matrices, the standard's 4-decimal matrix moves a* and b* by ~0.02.
    const cases = [
      { rgb: [1, 0, 0], ref: [53.2408, 80.0925, 67.2032] },
      { rgb: [0, 1, 0], ref: [87.7347, -86.1827, 83.1793] },
      { rgb: [0, 0, 1], ref: [32.297, 79.1875, -107.8602] },
    ] as const;
    for (const { rgb, ref } of cases) {
      const got = srgbToLab(rgb);
      expect(Math.abs(got.L - ref[0])).toBeLessThan(0.1);
      expect(Math.abs(got.a - ref[1])).toBeLessThan(0.1);
      expect(Math.abs(got.b - ref[2])).toBeLessThan(0.1);
    }
  });

  it('agrees with the test’s own formulas and inverts itself', () => {
    for (const rgb of [[0.2, 0.5, 0.9], [0.03, 0.02, 0.01], [0.7, 0.7, 0.7]] as const) {
      const ours = srgbToLab(rgb);
      const theirs = lab(rgb);
      expect(ours.L).toBeCloseTo(theirs.L, 10);
      expect(ours.a).toBeCloseTo(theirs.a, 10);
      expect(ours.b).toBeCloseTo(theirs.b, 10);
      // Round trip: 4-decimal forward and inverse matrices are inverse to about 1e-4.
      const back = labToSrgb(ours);
      for (let c = 0; c < 3; c++) expect(Math.abs(back[c] - rgb[c])).toBeLessThan(2e-4);
    }
    expect(deltaE76({ L: 50, a: 3, b: 4 }, { L: 50, a: 0, b: 0 })).toBe(5);
  });
});

describe('cubehelix (Green 2011)', () => {
  const green = { start: 0.5, rotations: -1.5, hue: 1, gamma: 1 }; // the paper's example parameters

  it('reproduces the paper’s equations at hand-computed points', () => {
    // lambda = 0.5, s = 0.5, r = -1.5, h = 1, gamma = 1:
    //   phi = 2 pi (0.5/3 - 0.75) = -3.665191 rad = -(pi + pi/6): cos = -0.866025, sin = +0.5
    //   a = 1 * 0.5 * 0.5 / 2 = 0.125
    //   R = 0.5 + 0.125 (-0.14861 * -0.866025 + 1.78277 * 0.5) = 0.5 + 0.125 * 1.020085 = 0.627511
    //   G = 0.5 + 0.125 (-0.29227 * -0.866025 - 0.90649 * 0.5) = 0.5 - 0.125 * 0.200132 = 0.474984
    //   B = 0.5 + 0.125 (1.97294 * -0.866025)                  = 0.5 - 0.125 * 1.708615 = 0.286423
    // lambda = 0.25: phi = 2 pi (1/6 - 0.375) = -75 deg: cos = 0.258819, sin = -0.965926;
    //   a = 0.25 * 0.75 / 2 = 0.09375
    //   R = 0.25 + 0.09375 (-0.038463 - 1.722024) = 0.25 - 0.165046 = 0.084954
    //   G = 0.25 + 0.09375 (-0.075645 + 0.875602) = 0.25 + 0.074996 = 0.324996
    //   B = 0.25 + 0.09375 (0.510634)             = 0.25 + 0.047872 = 0.297872
    // lambda = 0.5 with gamma = 2: lambda^gamma = 0.25, phi as for lambda = 0.5 (the angle
    //   uses lambda itself), a = 0.25 * 0.75 / 2 = 0.09375
    //   R = 0.25 + 0.09375 * 1.020085 = 0.345633; G = 0.25 - 0.09375 * 0.200132 = 0.231238;
    //   B = 0.25 - 0.09375 * 1.708615 = 0.089817
    // Tolerance 2e-6: the hand arithmetic keeps six decimals.
    const cases = [
      { lambda: 0.5, params: green, rgb: [0.627511, 0.474984, 0.286423] },
      { lambda: 0.25, params: green, rgb: [0.084954, 0.324996, 0.297872] },
      { lambda: 0.5, params: { ...green, gamma: 2 }, rgb: [0.345633, 0.231238, 0.089817] },
    ];
    for (const { lambda, params, rgb } of cases) {
      const got = cubehelixUnclipped(lambda, params);
      for (let c = 0; c < 3; c++) expect(Math.abs(got[c] - rgb[c])).toBeLessThan(2e-6);
    }
  });

  it('keeps Green’s brightness 0.30 R + 0.59 G + 0.11 B equal to lambda^gamma', () => {
    // The paper picks the two deviation directions with zero weighted brightness; with its
    // 5-digit coefficients the weighted sums are 1.1e-6 (cos) and 1.9e-6 (sin), times a <= h/8.
    for (const params of [green, { start: 2.2, rotations: 0.7, hue: 1.4, gamma: 0.8 }]) {
      for (let i = 0; i <= 20; i++) {
        const lambda = i / 20;
        const [r, g, b] = cubehelixUnclipped(lambda, params);
        expect(Math.abs(0.3 * r + 0.59 * g + 0.11 * b - lambda ** params.gamma)).toBeLessThan(1e-6);
      }
    }
  });

  it('runs from black to white and clips only out-of-range components', () => {
    expect([...cubehelixRgb(0, green)]).toEqual([0, 0, 0]);
    expect(cubehelixRgb(1, green).map((c) => Math.round(c * 1e12) / 1e12)).toEqual([1, 1, 1]);
    const strong = { start: 1, rotations: 0, hue: 3, gamma: 1 };
    const raw = cubehelixUnclipped(0.5, strong);
    expect(raw.some((c) => c < 0 || c > 1)).toBe(true);
    const clipped = cubehelixRgb(0.5, strong);
    for (let c = 0; c < 3; c++) expect(clipped[c]).toBe(Math.min(1, Math.max(0, raw[c])));
  });
});

describe('colour maps', () => {
  const sequential = colorMapNames.filter((n) => !isDivergingColorMap(n));
  const diverging = colorMapNames.filter((n) => isDivergingColorMap(n));

  it('has at least three sequential maps and one diverging map', () => {
    expect(sequential.length).toBeGreaterThanOrEqual(3);
    expect(diverging.length).toBeGreaterThanOrEqual(1);
  });

  it.each(sequential)('%s: CIE L* strictly increases along the map (1001 samples and the 8-bit table)', (name) => {
    const lookup = colorMapLookup(name);
    let previous = -Infinity;
    for (let i = 0; i <= 1000; i++) {
      const L = lightness(lookup(i / 1000));
      expect(L).toBeGreaterThan(previous);
      previous = L;
    }
    const table = buildColorTable(name);
    expect(table.length).toBe(768);
    previous = -Infinity;
    for (let k = 0; k < 256; k++) {
      const L = lightness([table[3 * k] / 255, table[3 * k + 1] / 255, table[3 * k + 2] / 255]);
      expect(L).toBeGreaterThan(previous);
      previous = L;
    }
    // Useful dynamic range: from near black to light, but the light end is not paper white.
    expect(lightness(lookup(0))).toBeLessThan(10);
    expect(lightness(lookup(1))).toBeGreaterThan(90);
  });

  it.each(diverging)('%s: L* is symmetric about the centre and rises towards it', (name) => {
    const lookup = colorMapLookup(name);
    for (let i = 0; i <= 500; i++) {
      const t = i / 1000;
      // By construction equal; 0.01 allows for clipping of components at 1e-9 outside the gamut.
      expect(Math.abs(lightness(lookup(t)) - lightness(lookup(1 - t)))).toBeLessThan(0.01);
      if (i > 0) expect(lightness(lookup(t))).toBeGreaterThan(lightness(lookup(t - 0.001)));
    }
    const low = lab(lookup(0));
    const high = lab(lookup(1));
    const centre = lab(lookup(0.5));
    expect(Math.hypot(centre.a, centre.b)).toBeLessThan(1); // neutral centre
    expect(deltaE76(low, high)).toBeGreaterThan(40); // the two ends are clearly different hues
  });

  it('table entries are the rounded lookup values', () => {
    const lookup = colorMapLookup('glacier');
    const table = buildColorTable('glacier');
    for (const k of [0, 77, 255]) {
      const rgb = lookup(k / 255);
      expect([table[3 * k], table[3 * k + 1], table[3 * k + 2]]).toEqual(rgb.map((c) => Math.round(255 * c)));
    }
  });

  it('refuses an unknown map, listing the known ones', () => {
    expect(() => colorMapLookup('rainbow')).toThrow(/'rainbow' is unknown; choose one of: .*ember/);
  });
});

describe('phase palette', () => {
  const named = [
    { name: 'empty', rgb: phasePalette.empty },
    { name: 'superfluid', rgb: phasePalette.superfluid },
    { name: 'Bose glass', rgb: phasePalette.boseGlass },
    { name: 'normal fluid', rgb: phasePalette.normalFluid },
    ...phasePalette.mottShells.map((rgb, i) => ({ name: `Mott n=${i + 1}`, rgb })),
  ];

  it('has pairwise distinct colours: CIE76 Delta E > 10 for every pair', () => {
    // Delta E*ab of about 2.3 is a just-noticeable difference (common practice); 10 keeps
    // neighbouring regions of a map apart at a glance.
    for (let i = 0; i < named.length; i++) {
      for (let j = i + 1; j < named.length; j++) {
        const d = deltaE76(lab8(named[i].rgb), lab8(named[j].rgb));
        expect(d, `${named[i].name} vs ${named[j].name}`).toBeGreaterThan(10);
      }
    }
  });

  it('does not paint the superfluid green', () => {
    // CIELAB hue angles of roughly 100..200 degrees read as green (common practice).
    const sf = lab8(phasePalette.superfluid);
    const hue = (Math.atan2(sf.b, sf.a) * 180) / Math.PI;
    expect(hue < 100 || hue > 200).toBe(true);
  });

  it('shades Mott shells darker with filling and caps the shades', () => {
    for (let n = 2; n <= 6; n++) expect(lab8(mottShellColor(n)).L).toBeLessThan(lab8(mottShellColor(n - 1)).L);
    expect(mottShellColor(9)).toEqual(mottShellColor(6));
    expect(phaseLabel(PhaseCode.mott, 2)).toBe('Mott insulator, n = 2');
    expect(phaseLabel(PhaseCode.mott, 7)).toBe('Mott insulator, n \u2265 6');
    expect(() => mottShellColor(0)).toThrow(/integer >= 1/);
  });

  it('uses the phase codes the solver writes', () => {
    expect(PhaseCode).toEqual({ empty: 0, superfluid: 1, mott: 2, boseGlass: 3, normalFluid: 4 });
    expect(phaseColor(PhaseCode.superfluid, 0)).toEqual(phasePalette.superfluid);
    expect(phaseColor(PhaseCode.mott, 3)).toEqual(phasePalette.mottShells[2]);
    expect(isPhaseCode(4)).toBe(true);
    expect(isPhaseCode(5)).toBe(false);
    expect(() => phaseColor(7, 0)).toThrow(/phase code 7 is unknown/);
  });
});
