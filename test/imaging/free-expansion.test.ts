// Finite-time time-of-flight pictures: the exact free expansion of the lattice state against
// independent computations (direct Fresnel quadrature of the initial field, direct sums of the
// expanded orbitals, a numerical integral along the line of sight) and its limits: the far
// field for t -> infinity (Gerbier et al., PRL 95, 050404 (2005)) and the quadratic-phase form
// of the finite-time pattern (Gerbier et al., PRL 101, 155303 (2008)).

import { describe, expect, it } from 'vitest';
import { freeExpansionImage, type FlightPixelGrid } from '../../src/imaging/freeExpansion.js';
import { harmonicGroundStateOrbital, hbarOverMassUm2PerMs, latticeWannierOrbital, type SiteOrbital1d } from '../../src/imaging/siteOrbital.js';
import { momentumStructureFactor, type OrderParameterField } from '../../src/observables/momentumStructureFactor.js';
import { timeOfFlightImage } from '../../src/imaging/timeOfFlight.js';
import { orbitalEnvelope } from '../../src/imaging/wannierEnvelope.js';
import { interferenceVisibility, pictureVisibility } from '../../src/imaging/interferenceVisibility.js';
import { timeOfFlightPicture } from '../../src/imaging/timeOfFlightPicture.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

const rb87Kg = 86.909180527 * 1.6605390666e-27; // recalled from memory (see time-of-flight.test.ts)
const a = 0.532;
const planck = 6.62607015e-34;
const peakUm = (tMs: number) => ((planck * tMs * 1e-3) / (rb87Kg * a * 1e-6)) * 1e6; // h t / (m a)

function randomField(shape: number[], seed: string, complex: boolean): OrderParameterField {
  const random = seededRandom(seed);
  const count = shape.reduce((x, y) => x * y, 1);
  const phiRe = Float64Array.from({ length: count }, () => random.uniform() - 0.3);
  const phiIm = complex ? Float64Array.from({ length: count }, () => random.uniform() - 0.6) : undefined;
  const density = Float64Array.from({ length: count }, (_, i) => phiRe[i] ** 2 + (phiIm?.[i] ?? 0) ** 2 + 0.5 * random.uniform());
  return { phiRe, ...(phiIm ? { phiIm } : {}), density, shape };
}

/** A trapped 2D state: superfluid disk (phi = sqrt(0.8), n = 1) inside radius r, Mott ring (phi = 0, n = 1) out to rMott. */
function trappedState(size: number, r: number, rMott = r): OrderParameterField {
  const phiRe = new Float64Array(size * size);
  const density = new Float64Array(size * size);
  const c = (size - 1) / 2;
  for (let x = 0; x < size; x++) {
    for (let y = 0; y < size; y++) {
      const d = Math.hypot(x - c, y - c);
      if (d <= r) {
        phiRe[x * size + y] = Math.sqrt(0.8);
        density[x * size + y] = 1;
      } else if (d <= rMott) density[x * size + y] = 1;
    }
  }
  return { phiRe, density, shape: [size, size] };
}

function values1(orbital: SiteOrbital1d, tMs: number, d: number): [number, number] {
  const re = new Float64Array(1);
  const im = new Float64Array(1);
  orbital.expand(tMs, rb87Kg).fill([d], re, im);
  return [re[0], im[0]];
}

describe('free expansion against independent computations', () => {
  it('equals a direct 2D Fresnel quadrature of the initial field (Gaussian orbitals, complex phi, depletion)', () => {
    // Reference: psi(x, y, t) = (m / (2 pi i hbar t)) int dx' dy' exp(i m |r - r'|^2 / (2 hbar t)) psi_0(r'),
    // psi_0 = sum_i phi_i g(x' - x_i) g(y' - y_i), by the midpoint rule on a 4 nm grid; the
    // incoherent part sum_i (n_i - |phi_i|^2) |g_t|^2 |g_t|^2 from the closed-form packet.
    const l = 0.08;
    const orbital = harmonicGroundStateOrbital(l);
    const field = randomField([3, 2], 'fresnel-2d', true);
    const tMs = 0.15;
    const pixel = 0.05;
    const grid: FlightPixelGrid = { nx: 9, ny: 7, pixelUm: pixel, firstXUm: -0.6, firstYUm: -0.35 };
    const image = freeExpansionImage(field, { massKg: rb87Kg, flightTimeMs: tMs, latticeSpacingUm: a, orbitals: [orbital, orbital], grid, subSamplesPerPixel: 1 });
    const alpha = 1 / (2 * hbarOverMassUm2PerMs(rb87Kg) * tMs);
    const g = (x: number) => Math.pow(Math.PI * l * l, -0.25) * Math.exp((-x * x) / (2 * l * l));
    const origin = { x: -a, y: -a / 2 };
    const h = 0.004;
    const span = Float64Array.from({ length: Math.round(3.2 / h) }, (_, i) => -1.6 + (i + 0.5) * h);
    const gx = [0, 1, 2].map((u) => Float64Array.from(span, (xp) => g(xp - (origin.x + u * a))));
    const gy = [0, 1].map((v) => Float64Array.from(span, (yp) => g(yp - (origin.y + v * a))));
    for (const [i, j] of [[0, 0], [4, 3], [7, 1], [2, 6]]) {
      const x = grid.firstXUm + i * pixel;
      const y = grid.firstYUm + j * pixel;
      let re = 0;
      let im = 0;
      for (let p = 0; p < span.length; p++) {
        for (let q = 0; q < span.length; q++) {
          let f0r = 0;
          let f0i = 0;
          for (let u = 0; u < 3; u++) {
            for (let v = 0; v < 2; v++) {
              const w = gx[u][p] * gy[v][q];
              f0r += field.phiRe[u * 2 + v] * w;
              f0i += (field.phiIm as Float64Array)[u * 2 + v] * w;
            }
          }
          if (Math.abs(f0r) + Math.abs(f0i) < 1e-300) continue;
          const ph = alpha * ((x - span[p]) ** 2 + (y - span[q]) ** 2);
          const c = Math.cos(ph);
          const s = Math.sin(ph);
          re += (f0r * c - f0i * s) * h * h;
          im += (f0r * s + f0i * c) * h * h;
        }
      }
      // |m / (2 pi i hbar t)|^2 = (alpha / pi)^2
      let density = (alpha / Math.PI) ** 2 * (re * re + im * im);
      for (let u = 0; u < 3; u++) {
        for (let v = 0; v < 2; v++) {
          const k = u * 2 + v;
          const depletion = field.density[k] - field.phiRe[k] ** 2 - (field.phiIm as Float64Array)[k] ** 2;
          const [ar, ai] = values1(orbital, tMs, x - (origin.x + u * a));
          const [br, bi] = values1(orbital, tMs, y - (origin.y + v * a));
          density += depletion * (ar * ar + ai * ai) * (br * br + bi * bi);
        }
      }
      const expected = density * pixel * pixel;
      expect(Math.abs(image.values[i * grid.ny + j] - expected)).toBeLessThan(1e-6 * expected);
    }
  });

  it('sums each layer coherently along the line of sight, as a numerical z integral of the 3D density confirms', () => {
    // Direct sums with the expanded Wannier orbitals for a random 3D state imaged along each
    // axis, and for one pixel the full int dz |sum_i phi_i w_t(x - x_i) w_t(y - y_i) w_t(z - z_i)|^2
    // on a z grid (Wannier functions of different layers stay orthogonal: no cross terms).
    const orbital = latticeWannierOrbital(10, a);
    const tMs = 0.6;
    const shape = [3, 4, 2];
    const field = randomField(shape, 'column-3d', false);
    const n = shape;
    for (const axis of [0, 1, 2] as const) {
      const kept = [0, 1, 2].filter((d) => d !== axis);
      const lu = n[kept[0]];
      const lv = n[kept[1]];
      const grid: FlightPixelGrid = { nx: 5, ny: 4, pixelUm: 0.7, firstXUm: -1.3, firstYUm: -1.1 };
      const image = freeExpansionImage(field, { massKg: rb87Kg, flightTimeMs: tMs, latticeSpacingUm: a, orbitals: [orbital, orbital], imagingAxis: axis, grid, subSamplesPerPixel: 1 });
      const origin = { x: (-(lu - 1) * a) / 2, y: (-(lv - 1) * a) / 2 };
      const site = (u: number, v: number, layer: number) => {
        const idx = [0, 0, 0];
        idx[axis] = layer;
        idx[kept[0]] = u;
        idx[kept[1]] = v;
        return (idx[0] * n[1] + idx[1]) * n[2] + idx[2];
      };
      for (const [i, j] of [[0, 0], [2, 1], [4, 3]]) {
        const x = grid.firstXUm + i * grid.pixelUm;
        const y = grid.firstYUm + j * grid.pixelUm;
        let direct = 0;
        for (let layer = 0; layer < n[axis]; layer++) {
          let re = 0;
          let im = 0;
          for (let u = 0; u < lu; u++) {
            for (let v = 0; v < lv; v++) {
              const [ar, ai] = values1(orbital, tMs, x - (origin.x + u * a));
              const [br, bi] = values1(orbital, tMs, y - (origin.y + v * a));
              const p = field.phiRe[site(u, v, layer)];
              re += p * (ar * br - ai * bi);
              im += p * (ar * bi + ai * br);
              const k = site(u, v, layer);
              direct += (field.density[k] - p * p) * (ar * ar + ai * ai) * (br * br + bi * bi);
            }
          }
          direct += re * re + im * im;
        }
        expect(Math.abs(image.values[i * grid.ny + j] / (grid.pixelUm * grid.pixelUm) - direct)).toBeLessThan(1e-10 * direct);
        if (axis === 2 && i === 2) {
          // The z integral itself, coherent part only.
          const zs = Float64Array.from({ length: 6001 }, (_, q) => -30 + q * 0.01);
          const zOrigin = -a / 2;
          const wz = [0, 1].map((layer) => {
            const re = new Float64Array(zs.length);
            const im = new Float64Array(zs.length);
            orbital.expand(tMs, rb87Kg).fill(Float64Array.from(zs, (z) => z - (zOrigin + layer * a)), re, im);
            return { re, im };
          });
          let integral = 0;
          let coherentLayers = 0;
          for (let q = 0; q < zs.length; q++) {
            let re = 0;
            let im = 0;
            for (let u = 0; u < lu; u++) {
              for (let v = 0; v < lv; v++) {
                const [ar, ai] = values1(orbital, tMs, x - (origin.x + u * a));
                const [br, bi] = values1(orbital, tMs, y - (origin.y + v * a));
                const xyRe = ar * br - ai * bi;
                const xyIm = ar * bi + ai * br;
                for (let layer = 0; layer < 2; layer++) {
                  const p = field.phiRe[site(u, v, layer)];
                  const zr = wz[layer].re[q];
                  const zi = wz[layer].im[q];
                  re += p * (xyRe * zr - xyIm * zi);
                  im += p * (xyRe * zi + xyIm * zr);
                }
              }
            }
            integral += (re * re + im * im) * 0.01;
          }
          for (let layer = 0; layer < 2; layer++) {
            let re = 0;
            let im = 0;
            for (let u = 0; u < lu; u++) {
              for (let v = 0; v < lv; v++) {
                const [ar, ai] = values1(orbital, tMs, x - (origin.x + u * a));
                const [br, bi] = values1(orbital, tMs, y - (origin.y + v * a));
                const p = field.phiRe[site(u, v, layer)];
                re += p * (ar * br - ai * bi);
                im += p * (ar * bi + ai * br);
              }
            }
            coherentLayers += re * re + im * im;
          }
          expect(Math.abs(integral - coherentLayers)).toBeLessThan(1e-6 * coherentLayers);
        }
      }
    }
  });

  it('holds all the atoms when the frame covers the expanded cloud (orthonormal Wannier functions)', () => {
    // int |sum_i phi_i w_t(r - r_i)|^2 d^2r = sum_i |phi_i|^2 exactly for orthonormal w_t, and the
    // incoherent part integrates to sum_i (n_i - |phi_i|^2): the picture holds sum_i n_i atoms.
    const orbital = latticeWannierOrbital(10, a);
    const field = trappedState(12, 4, 5.5);
    const tMs = 1.5;
    const width = orbital.expand(tMs, rb87Kg).rmsWidthUm;
    const pixel = 0.5;
    const count = 2 * Math.ceil((7 * width + 4) / pixel) + 1;
    const grid: FlightPixelGrid = { nx: count, ny: count, pixelUm: pixel, firstXUm: (-(count - 1) * pixel) / 2, firstYUm: (-(count - 1) * pixel) / 2 };
    const image = freeExpansionImage(field, { massKg: rb87Kg, flightTimeMs: tMs, latticeSpacingUm: a, orbitals: [orbital, orbital], grid });
    const atoms = field.density.reduce((s, v) => s + v, 0);
    expect(image.atomNumber).toBeCloseTo(atoms, 12);
    expect(Math.abs(image.atomsInImage / atoms - 1)).toBeLessThan(1e-4);
  });
});

describe('limits of the finite-time picture', () => {
  const orbital = latticeWannierOrbital(10, a);
  const envelope = orbitalEnvelope([orbital, orbital]);
  const field = trappedState(16, 7);
  // Cloud radius 7 sites: t_ff = m R^2 / hbar = 19 ms.

  function onFarFieldGrid(tMs: number) {
    const structure = momentumStructureFactor(field, { samplesPerZone: 32 });
    const far = timeOfFlightImage(structure, { latticeSpacingUm: a, massKg: rb87Kg, flightTimeMs: tMs, envelope });
    const grid: FlightPixelGrid = { nx: far.nx, ny: far.ny, pixelUm: far.pixelUm, firstXUm: far.xCentresUm[0], firstYUm: far.yCentresUm[0] };
    const finite = freeExpansionImage(field, { massKg: rb87Kg, flightTimeMs: tMs, latticeSpacingUm: a, orbitals: [orbital, orbital], grid, subSamplesPerPixel: 1 });
    return { far, finite };
  }

  it('converges to the far-field picture n(k), k = m x / (hbar t), as t grows', () => {
    // Far field: n(k) = |w~(k)|^2 [C(k) + I] (Gerbier et al. 2005), sampled at the same pixel centres.
    const errors: number[] = [];
    for (const tMs of [20, 200, 2000]) {
      const { far, finite } = onFarFieldGrid(tMs);
      let diff = 0;
      let total = 0;
      for (let i = 0; i < far.values.length; i++) {
        diff += Math.abs(finite.values[i] - far.values[i]);
        total += far.values[i];
      }
      errors.push(diff / total);
    }
    expect(errors[0]).toBeGreaterThan(0.01); // at t ~ t_ff the far field is off by a few per cent
    expect(errors[2]).toBeLessThan(1e-5);
    // The quadratic phase alpha x_i^2 and the envelope shift 2 alpha x_i are O(1/t); for a real,
    // inversion-symmetric cloud their first-order effects on |field|^2 cancel, leaving O(1/t^2):
    // a factor 100 per decade of t.
    expect(errors[1] / errors[2]).toBeGreaterThan(70);
    expect(errors[1] / errors[2]).toBeLessThan(130);
  });

  it('follows the quadratic-phase form of Gerbier et al. (2008) between the two limits', () => {
    // For t >> m R sigma_w / hbar (the site packet's envelope hardly shifts across the cloud)
    // the exact field reduces to psi ~ exp(i alpha x^2) w~(k) sum_i phi_i exp(i alpha x_i^2) e^{-i k.x_i},
    // alpha = m / (2 hbar t), k = m x / (hbar t): the far field with the quadratic phase kept on the
    // in-trap field (Gerbier et al., PRL 101, 155303 (2008), their finite-time structure factor;
    // form recalled from memory). Here t = t_ff / 4: the peak is far from its far-field shape.
    const tMs = 5;
    const { far, finite } = onFarFieldGrid(tMs);
    const alpha = 1 / (2 * hbarOverMassUm2PerMs(rb87Kg) * tMs);
    const size = 16;
    const c = (size - 1) / 2;
    const x1 = peakUm(tMs);
    const quadratic = (x: number, y: number): number => {
      const kx = 2 * alpha * x;
      const ky = 2 * alpha * y;
      let re = 0;
      let im = 0;
      let depletion = 0;
      for (let u = 0; u < size; u++) {
        for (let v = 0; v < size; v++) {
          const p = field.phiRe[u * size + v];
          depletion += field.density[u * size + v] - p * p;
          if (p === 0) continue;
          const xu = (u - c) * a;
          const yv = (v - c) * a;
          const ph = alpha * (xu * xu + yv * yv) - kx * xu - ky * yv;
          re += p * Math.cos(ph);
          im += p * Math.sin(ph);
        }
      }
      // n = (alpha / pi)^2 |w~(kx) w~(ky)|^2 (|S|^2 + depletion) per area
      return (alpha / Math.PI) ** 2 * envelope.at(kx, ky) * (re * re + im * im + depletion);
    };
    let worstQuadratic = 0;
    let worstFar = 0;
    const pixelArea = far.pixelUm ** 2;
    const j = far.ny / 2; // y = 0 row through the first-order peak
    const row: number[] = [];
    for (let i = 0; i < far.nx; i++) if (Math.abs(far.xCentresUm[i] - x1) <= 0.1 * x1) row.push(i);
    const peak = Math.max(...row.map((i) => finite.values[i * far.ny + j])) / pixelArea;
    for (const i of row) {
      const exact = finite.values[i * far.ny + j] / pixelArea;
      worstQuadratic = Math.max(worstQuadratic, Math.abs(quadratic(far.xCentresUm[i], far.yCentresUm[j]) - exact) / peak);
      worstFar = Math.max(worstFar, Math.abs(far.values[i * far.ny + j] / pixelArea - exact) / peak);
    }
    // Measured: 2.4 % of the peak against 37 % for the far field. The neglected envelope shift
    // across the cloud is first order in 2 alpha R k l^2 ~ 0.1 here (l: the Wannier function's
    // Gaussian length), partly cancelling between the two halves of the cloud.
    expect(worstQuadratic).toBeLessThan(0.03);
    expect(worstFar).toBeGreaterThan(0.3);
  });

  it('measures the far-field visibility on the far-field picture and approaches it at long flights', () => {
    // Two quadratures of the same V (Gerbier et al. 2005): disks on the structure factor
    // (interferenceVisibility) and disks on the picture's pixels (pictureVisibility).
    const structure = momentumStructureFactor(field, { samplesPerZone: 32 });
    const fromStructure = interferenceVisibility(structure, { latticeSpacingUm: a, envelope }).visibility;
    const longFlight = onFarFieldGrid(2000);
    const fromFarPicture = pictureVisibility(longFlight.far, { firstOrderPeakUm: peakUm(2000) }).visibility;
    const fromFinitePicture = pictureVisibility(longFlight.finite, { firstOrderPeakUm: peakUm(2000) }).visibility;
    expect(Math.abs(fromFarPicture - fromStructure)).toBeLessThan(2e-3);
    expect(Math.abs(fromFinitePicture - fromStructure)).toBeLessThan(5e-3);
    // At t = t_ff / 8 the broadened peaks spill out of the disks: V falls (0.942 against 0.956).
    const nearField = onFarFieldGrid(2.5);
    expect(pictureVisibility(nearField.finite, { firstOrderPeakUm: peakUm(2.5) }).visibility).toBeLessThan(fromStructure - 0.01);
  });
});

describe('time-of-flight picture of a cloud', () => {
  const orbital = latticeWannierOrbital(12, a);
  const field = trappedState(20, 8, 9.5);
  const common = { field, imagingAxis: 2 as const, massKg: rb87Kg, latticeSpacingUm: a, orbitals: [orbital, orbital] as const };

  it('labels the far-field picture as an approximation and warns before the far-field time', () => {
    const near = timeOfFlightPicture({ ...common, flightTimeMs: 5, model: 'far-field' });
    expect(near.label).toBe('far-field approximation');
    expect(near.farField.notice?.code).toBe('tof-near-field');
    expect(near.farField.notice?.severity).toBe('warning');
    const finite = timeOfFlightPicture({ ...common, flightTimeMs: 5, model: 'free-expansion' });
    expect(finite.label).toBe('free expansion');
    expect(finite.farField.notice?.severity).toBe('info');
    expect(finite.description).toContain('interactions neglected');
    const late = timeOfFlightPicture({ ...common, flightTimeMs: 500, model: 'far-field' });
    expect(late.farField.notice).toBeNull();
  });

  it('puts both models on the camera pixels with the right momentum scale, and they agree at long flights', () => {
    // Camera pixel 13 um behind a magnification 2: 6.5 um in the plane of the atoms; t = 6 t_ff.
    const tMs = 200;
    const far = timeOfFlightPicture({ ...common, flightTimeMs: tMs, model: 'far-field', objectPixelUm: 6.5 });
    const finite = timeOfFlightPicture({ ...common, flightTimeMs: tMs, model: 'free-expansion', objectPixelUm: 6.5 });
    for (const p of [far, finite]) {
      expect(p.pixelUm).toBe(6.5);
      expect(p.scales.firstOrderPeakUm).toBeCloseTo(peakUm(tMs), 9);
      // m p / (hbar t) = 2 pi p / (a x_1), x_1 = h t / (m a)
      expect(p.metadata.wavenumberPerPixelInverseUm).toBeCloseTo((2 * Math.PI * 6.5) / (a * peakUm(tMs)), 12);
      expect(p.xCentresUm[(p.nx - 1) / 2]).toBeCloseTo(0, 12);
    }
    expect(Math.abs(far.visibility.visibility - finite.visibility.visibility)).toBeLessThan(5e-3);
    expect(Math.abs(far.momentumVisibility.visibility - finite.momentumVisibility.visibility)).toBe(0);
    // Same frame of three zones (plus the cloud for the finite picture): the same atoms, short of
    // the total by the envelope's tail beyond the third zone.
    const atoms = field.density.reduce((s, v) => s + v, 0);
    expect(Math.abs(finite.atomsInPicture - far.atomsInPicture) / atoms).toBeLessThan(0.005);
    expect(finite.atomsInPicture).toBeLessThan(atoms);
  });
});
