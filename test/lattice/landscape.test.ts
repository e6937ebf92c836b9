// Landscape terms (src/lattice/landscape) against site energies worked out by hand: a linear
// tilt, boxes with sharp and erf edges (reference values of the normal distribution function
// from CPython's statistics.NormalDist, i.e. A&S 26.2), a second standing wave, and the
// placement of potential pictures (a single bright pixel must land on the site x = column,
// y = row; rotation and offset move it where the geometry says; area averaging conserves
// the integral of the picture).
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { alongAxis, boxPotential, gradientPotential, imagePotential, standingWavePotential } from '../../src/lattice/landscape/index.js';

const geometry = (shape: number[]) => createLatticeGeometry(shape, shape.map(() => false));
const at = (shape: number[], ...c: number[]): number => (shape.length === 1 ? c[0] : shape.length === 2 ? c[0] * shape[1] + c[1] : (c[0] * shape[1] + c[1]) * shape[2] + c[2]);

describe('gradient', () => {
  it('eps = slope e . (r - r0) on a 4 x 3 lattice, direction (3, 4), 2 per site, zero at offset (0.5, 0)', () => {
    const shape = [4, 3];
    const eps = gradientPotential(geometry(shape), { direction: [3, 4], slope: 2, offset: [0.5, 0], lengthPerSite: [1, 1] });
    // x = i - 1.5, y = j - 1 from the lattice centre: eps = 2 (0.6 (x - 0.5) + 0.8 y) = 1.2 (i - 2) + 1.6 (j - 1).
    const hand: Array<[number, number, number]> = [
      [0, 0, -4.0],
      [0, 1, -2.4],
      [0, 2, -0.8],
      [1, 0, -2.8],
      [2, 1, 0],
      [3, 2, 2.8],
    ];
    for (const [i, j, v] of hand) expect(eps[at(shape, i, j)]).toBeCloseTo(v, 14);
  });

  it('micrometre lengths: the same tilt per µm on a spacing of 0.5 µm is half as steep per site', () => {
    const g = geometry([5]);
    const perUm = gradientPotential(g, { direction: [1], slope: 4, offset: [0], lengthPerSite: [0.5] });
    expect(Array.from(perUm)).toEqual([-4, -2, 0, 2, 4]);
  });
});

describe('box', () => {
  it('sharp disc of radius 2 on a 7 x 7 lattice, wall 5: 0 inside, 5 outside, 2.5 on the rim', () => {
    const shape = [7, 7];
    const eps = boxPotential(geometry(shape), { shape: { kind: 'disc', radius: 2 }, wallHeight: 5, edgeWidth: 0, offset: [0, 0], lengthPerSite: [1, 1] });
    expect(eps[at(shape, 3, 3)]).toBe(0);
    expect(eps[at(shape, 4, 4)]).toBe(0); // r = sqrt 2
    expect(eps[at(shape, 5, 3)]).toBe(2.5); // r = 2 exactly
    expect(eps[at(shape, 3, 1)]).toBe(2.5);
    expect(eps[at(shape, 5, 4)]).toBe(5); // r = sqrt 5
    expect(eps[at(shape, 0, 0)]).toBe(5);
  });

  it('rectangle of width 4 with an erf edge of sigma 1 on a chain: wall 10 (1 - [Phi(2 - u) - Phi(-2 - u)])', () => {
    const eps = boxPotential(geometry([9]), { shape: { kind: 'rectangle', size: [4], angleRad: 0 }, wallHeight: 10, edgeWidth: 1, offset: [0], lengthPerSite: [1] });
    // u = site offset from the centre; values from CPython statistics.NormalDist().cdf.
    const hand: Array<[number, number]> = [
      [0, 0.45500263896358417],
      [1, 1.6000515196308718],
      [2, 5.000316712418331],
      [3, 8.413450327201149],
      [4, 9.772498690384083],
    ];
    for (const [u, v] of hand) {
      expect(Math.abs(eps[4 + u] - v)).toBeLessThan(1e-13);
      expect(Math.abs(eps[4 - u] - v)).toBeLessThan(1e-13);
    }
  });

  it('ring 1.5 < r < 3 (sharp, wall 1): the centre is walled, r = 2 inside, r = 3 on the rim', () => {
    const shape = [9, 9];
    const eps = boxPotential(geometry(shape), { shape: { kind: 'ring', innerRadius: 1.5, outerRadius: 3 }, wallHeight: 1, edgeWidth: 0, offset: [0, 0], lengthPerSite: [1, 1] });
    expect(eps[at(shape, 4, 4)]).toBe(1);
    expect(eps[at(shape, 4, 3)]).toBe(1); // r = 1
    expect(eps[at(shape, 6, 4)]).toBe(0); // r = 2
    expect(eps[at(shape, 7, 4)]).toBe(0.5); // r = 3
    expect(eps[at(shape, 8, 8)]).toBe(1);
  });

  it('rectangle 2 x 6 rotated by 45 degrees, moved by an offset', () => {
    const shape = [9, 9];
    const eps = boxPotential(geometry(shape), {
      shape: { kind: 'rectangle', size: [2, 6], angleRad: Math.PI / 4 },
      wallHeight: 1,
      edgeWidth: 0,
      offset: [1, 0],
      lengthPerSite: [1, 1],
    });
    // Frame: u = (x' + y)/sqrt 2, v = (y - x')/sqrt 2, x' = x - 1. Inside |u| < 1, |v| < 3.
    expect(eps[at(shape, 4 + 1 - 2, 4 + 2)]).toBe(0); // x' = -2, y = 2: u = 0, v = 2.83
    expect(eps[at(shape, 4 + 1 + 2, 4 + 2)]).toBe(1); // x' = 2, y = 2: u = 2.83
    expect(eps[at(shape, 4 + 1 + 1, 4 - 1)]).toBe(0); // u = 0, v = -1.41
    expect(eps[at(shape, 4 - 3, 4 + 3)]).toBe(1); // x' = -4, y = 3: v = 4.95
  });

  it('3D: a disc is a cylinder along z', () => {
    const shape = [5, 5, 3];
    const eps = boxPotential(geometry(shape), { shape: { kind: 'disc', radius: 1.2 }, wallHeight: 2, edgeWidth: 0, offset: [0, 0, 0], lengthPerSite: [1, 1, 1] });
    for (let z = 0; z < 3; z++) {
      expect(eps[at(shape, 2, 2, z)]).toBe(0);
      expect(eps[at(shape, 2, 3, z)]).toBe(0);
      expect(eps[at(shape, 3, 3, z)]).toBe(2);
    }
  });
});

describe('second standing wave sampled at sites', () => {
  it('period 2, phase 0: 0, V2, 0, V2 along x; and it depends on its axis only', () => {
    const shape = [2, 3, 4];
    const eps = standingWavePotential(geometry(shape), { axis: 2, amplitude: 3, periodSites: 2, phaseRad: 0 });
    for (let x = 0; x < 2; x++) {
      for (let y = 0; y < 3; y++) {
        expect(eps[at(shape, x, y, 0)]).toBe(0);
        expect(eps[at(shape, x, y, 1)]).toBe(3);
        expect(eps[at(shape, x, y, 2)]).toBeLessThan(1e-30);
        expect(eps[at(shape, x, y, 3)]).toBe(3);
      }
    }
    // phase pi/4 with period 4 along y: 3 sin^2(pi y / 4 + pi/4) = 1.5, 3, 1.5
    const e2 = standingWavePotential(geometry(shape), { axis: 1, amplitude: 3, periodSites: 4, phaseRad: Math.PI / 4 });
    expect(e2[at(shape, 1, 0, 2)]).toBeCloseTo(1.5, 14);
    expect(e2[at(shape, 1, 1, 2)]).toBeCloseTo(3, 14);
    expect(e2[at(shape, 0, 2, 3)]).toBeCloseTo(1.5, 14);
  });

  it('alongAxis spreads a profile in C order', () => {
    const shape = [2, 3];
    expect(Array.from(alongAxis(geometry(shape), 0, Float64Array.from([7, 9])))).toEqual([7, 7, 7, 9, 9, 9]);
    expect(Array.from(alongAxis(geometry(shape), 1, Float64Array.from([1, 2, 3])))).toEqual([1, 2, 3, 1, 2, 3]);
  });
});

describe('potential pictures', () => {
  const place = (offset: [number, number] = [0, 0], angleRad = 0, pixelSize = 1, scale = 1, resampling: 'bilinear' | 'area' | 'auto' = 'bilinear') => ({
    pixelSize,
    offset,
    angleRad,
    lengthPerSite: [1, 1],
    scale,
    resampling,
  });

  it('a single bright pixel lands on the site x = column, y = row (non-square lattice, no transposition)', () => {
    const shape = [5, 7]; // nx = 5, ny = 7
    const W = 5;
    const H = 7;
    for (const [row, col] of [
      [2, 4],
      [0, 0],
      [6, 1],
    ]) {
      const values = new Float64Array(W * H);
      values[row * W + col] = 1000;
      const r = imagePotential(geometry(shape), { values, width: W, height: H }, place([0, 0], 0, 1, 0.5));
      for (let x = 0; x < 5; x++) {
        for (let y = 0; y < 7; y++) expect(r.siteEnergy[at(shape, x, y)]).toBe(x === col && y === row ? 500 : 0);
      }
      expect(r.sitesCovered).toBe(35);
    }
  });

  it('offset and rotation move the pixel where the geometry says', () => {
    const shape = [9, 9];
    const values = new Float64Array(9);
    values[0 * 3 + 2] = 1; // row 0, col 2 of a 3 x 3 picture: (u, v) = (1, -1) from its centre
    // offset (2, -1): the picture centre is at site (6, 3), the pixel at (7, 2)
    let r = imagePotential(geometry(shape), { values, width: 3, height: 3 }, place([2, -1]));
    expect(r.siteEnergy[at(shape, 7, 2)]).toBe(1);
    expect(r.siteEnergy.reduce((a, b) => a + b, 0)).toBe(1);
    // 90 degrees from x towards y: (u, v) = (1, -1) goes to (dx, dy) = (-v, u) = (1, 1): site (5, 5)
    r = imagePotential(geometry(shape), { values, width: 3, height: 3 }, place([0, 0], Math.PI / 2));
    expect(r.siteEnergy[at(shape, 5, 5)]).toBeCloseTo(1, 12);
    let sum = 0;
    for (let i = 0; i < r.siteEnergy.length; i++) sum += r.siteEnergy[i];
    expect(sum).toBeCloseTo(1, 12);
  });

  it('bilinear between pixel centres, edge pixels extended inside the footprint, 0 outside', () => {
    // Picture of 2 x 1 pixels of 2 sites, values [0, 10], on a 7-site chain: footprint -2..2.
    const r = imagePotential(geometry([7]), { values: Float64Array.from([0, 10]), width: 2, height: 1 }, { ...place([0, 0], 0, 2), lengthPerSite: [1] });
    expect(Array.from(r.siteEnergy)).toEqual([0, 0, 0, 5, 10, 10, 0]);
    expect(r.sitesCovered).toBe(5);
  });

  it('area average: a site gets the mean of its four half-site pixels, and the integral is conserved', () => {
    const shape = [4, 4];
    const W = 8;
    const values = new Float64Array(W * W);
    let seed = 3;
    for (let i = 0; i < values.length; i++) {
      seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
      values[i] = seed / 4294967296;
    }
    const r = imagePotential(geometry(shape), { values, width: W, height: W }, place([0, 0], 0, 0.5, 1, 'auto'));
    expect(r.resampling).toBe('area');
    // site (x, y) covers pixels rows 2y..2y+1, columns 2x..2x+1
    for (const [x, y] of [
      [0, 0],
      [3, 1],
      [2, 3],
    ]) {
      const mean = (values[2 * y * W + 2 * x] + values[2 * y * W + 2 * x + 1] + values[(2 * y + 1) * W + 2 * x] + values[(2 * y + 1) * W + 2 * x + 1]) / 4;
      expect(r.siteEnergy[at(shape, x, y)]).toBeCloseTo(mean, 14);
    }
    let sites = 0;
    let pixels = 0;
    for (const v of r.siteEnergy) sites += v; // site area 1
    for (const v of values) pixels += v * 0.25; // pixel area 0.25
    expect(Math.abs(sites - pixels)).toBeLessThan(1e-12);
  });
});
