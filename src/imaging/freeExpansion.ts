// Time-of-flight picture at a finite flight time: the exact free expansion of the Gutzwiller
// state's one-body density matrix with the site orbitals (interactions neglected during the
// flight), evaluated on the camera's pixels.
//
// After the lattice and trap are switched off, the field operator evolves freely:
// psi(r, t) = sum_i w_t(r - r_i) b_i, with w_t the freely expanded site orbital
// (siteOrbital.ts). The density is sum_ij w_t*(r - r_i) w_t(r - r_j) <b_i^+ b_j>, and in the
// product (Gutzwiller) state <b_i^+ b_j> = phi_i^* phi_j for i != j, so
//     n(r, t) = |sum_i phi_i w_t(r - r_i)|^2 + sum_i (n_i - |phi_i|^2) |w_t(r - r_i)|^2
// (the same split as the far field, Gerbier et al., PRL 95, 050404 (2005); the far field
// drops the quadratic phase exp(i m x'^2 / (2 hbar t)) of the Fresnel integral, which is
// what makes finite flights differ, Gerbier et al., PRL 101, 155303 (2008)).
//
// Column along the imaging axis: the site orbital is a product w_t(x) w_t(y) w_t(z), and
// free evolution is unitary, so orbitals of different layers stay orthogonal after any
// flight: int dz w_t*(z - z_l) w_t(z - z_l') = delta_ll'. Integrating n over z therefore
// leaves sum over layers of |sum_{i in layer} phi_i w_t(x - x_i) w_t(y - y_i)|^2 (each layer
// interferes with itself only: the column of |psi|^2, not of psi) plus the incoherent part
// with the column-summed depletion sum_z (n_i - |phi_i|^2).
//
// Numerics (separable by axis, no approximation beyond pixel sub-sampling): with Wx[p, u] =
// w_t(x_p - x_u) and Wy[q, v] = w_t(y_q - y_v), a layer's field on the sub-pixel grid is the
// matrix product A = Wx Phi Wy^T; the incoherent part is Gx D Gy^T with Gx, Gy the
// pixel-integrated |w_t|^2 and D the depletion column. A camera pixel collects the atoms
// over its area: each pixel is sampled at s x s sub-pixel midpoints (s chosen from the
// narrowest feature, the width of an interference peak from a cloud as wide as the lattice,
// h t / (m a L)), and the incoherent part is integrated per axis. Cost per layer:
// (L_u L_v Q s + P s L_u Q s) complex multiply-adds (P x Q pixels, L_u x L_v sites).
//
// Optional bond coherences (particleHoleCoherence.ts: the first-order strong-coupling
// correlations <b_i^+ b_j> of Mott regions, which the product state lacks) add
// sum_bonds c_b 2 Re[w_t*(r - r_i) w_t(r - r_j)], separable in the same way.

import { columnProjection } from '../lattice/columnProjection.js';
import { gridSizes } from '../lattice/gridShape.js';
import type { OrderParameterField } from '../observables/momentumStructureFactor.js';
import { hbarOverMassUm2PerMs, type SiteOrbital1d } from './siteOrbital.js';
import type { BondCoherenceColumns } from './particleHoleCoherence.js';
import { pixelCentresUm, type PixelPicture } from './pixelPicture.js';

/** Pixel grid after the flight: pixel (k, l) is centred at (firstXUm + k pixelUm, firstYUm + l pixelUm). */
export interface FlightPixelGrid {
  nx: number;
  ny: number;
  /** Pixel size in the plane of the atoms (camera pixel / magnification), um. */
  pixelUm: number;
  firstXUm: number;
  firstYUm: number;
}

export interface FreeExpansionOptions {
  massKg: number;
  flightTimeMs: number;
  /** Lattice spacing along image axes 0 and 1, um (one number for both). */
  latticeSpacingUm: number | readonly [number, number];
  /** Site orbitals along image axes 0 and 1. */
  orbitals: readonly [SiteOrbital1d, SiteOrbital1d];
  /** Lattice axis the camera looks along; default 2. */
  imagingAxis?: 0 | 1 | 2;
  grid: FlightPixelGrid;
  /** Position of site (0, 0) of the kept axes in the picture's coordinates, um; default: the lattice centre at 0. */
  originUm?: { x: number; y: number };
  /** Sub-pixel samples per pixel and axis; default from the narrowest feature (1 to 8). */
  subSamplesPerPixel?: number;
  /** Column-summed bond coherences of the kept axes (optional strong-coupling correction). */
  bondCoherence?: BondCoherenceColumns;
}

/** Atoms per pixel in `values`, index i * ny + j (axis 0 = first kept lattice axis). */
export interface FreeExpansionImage extends PixelPicture {
  /** Atoms in the picture from the coherent term, the incoherent term and the bond term. */
  coherentAtoms: number;
  incoherentAtoms: number;
  bondAtoms: number;
  atomsInImage: number;
  /** sum_i n_i. */
  atomNumber: number;
  subSamplesPerPixel: number;
  /** Layers along the imaging axis that carried coherence. */
  coherentLayers: number;
}

const maxSubSamples = 8;
/** Complex multiply-adds per layer the automatic sub-sampling may spend (about a second). */
const workBudget = 3e8;

/** Default sub-pixel count: about three samples across the narrowest feature, h t / (m a L). */
export function defaultSubSamples(pixelUm: number, featureUm: number): number {
  if (!(featureUm > 0)) return 1;
  return Math.max(1, Math.min(maxSubSamples, Math.ceil((3 * pixelUm) / featureUm)));
}

/** Fills the (P s) sub-pixel centres of one axis. */
function subPixelCentres(n: number, first: number, pixel: number, s: number): Float64Array {
  const out = new Float64Array(n * s);
  for (let p = 0; p < n; p++) {
    for (let a = 0; a < s; a++) out[p * s + a] = first + p * pixel + ((a + 0.5) / s - 0.5) * pixel;
  }
  return out;
}

/** W[p, u] = w_t(x_p - x_u) for sub-pixel p and site u, row-major (p * sites + u). */
function orbitalMatrix(
  expanded: ReturnType<SiteOrbital1d['expand']>,
  points: Float64Array,
  sites: number,
  originUm: number,
  spacingUm: number,
): { re: Float64Array; im: Float64Array } {
  const re = new Float64Array(points.length * sites);
  const im = new Float64Array(points.length * sites);
  const d = new Float64Array(sites);
  const r = new Float64Array(sites);
  const i = new Float64Array(sites);
  for (let p = 0; p < points.length; p++) {
    for (let u = 0; u < sites; u++) d[u] = points[p] - (originUm + u * spacingUm);
    expanded.fill(d, r, i);
    re.set(r, p * sites);
    im.set(i, p * sites);
  }
  return { re, im };
}

/** G[p, u] = sum over the s sub-samples of pixel p of |W|^2 times (pixel / s): pixel-integrated |w_t|^2. */
function pixelDensity(W: { re: Float64Array; im: Float64Array }, pixels: number, s: number, sites: number, weight: number): Float64Array {
  const G = new Float64Array(pixels * sites);
  for (let p = 0; p < pixels; p++) {
    for (let a = 0; a < s; a++) {
      const row = (p * s + a) * sites;
      for (let u = 0; u < sites; u++) G[p * sites + u] += (W.re[row + u] * W.re[row + u] + W.im[row + u] * W.im[row + u]) * weight;
    }
  }
  return G;
}

/** K[p, u] = pixel-integrated 2 Re[w_t*(x - x_u) w_t(x - x_(u+1))] for bonds u = 0 .. sites - 2. */
function pixelBondDensity(W: { re: Float64Array; im: Float64Array }, pixels: number, s: number, sites: number, weight: number): Float64Array {
  const K = new Float64Array(pixels * sites);
  for (let p = 0; p < pixels; p++) {
    for (let a = 0; a < s; a++) {
      const row = (p * s + a) * sites;
      for (let u = 0; u + 1 < sites; u++) {
        K[p * sites + u] += 2 * (W.re[row + u] * W.re[row + u + 1] + W.im[row + u] * W.im[row + u + 1]) * weight;
      }
    }
  }
  return K;
}

/** image[p, q] += sum_uv Gx[p, u] C[u, v] Gy[q, v]; returns the atoms added. */
function addSeparable(image: Float64Array, P: number, Q: number, Gx: Float64Array, C: Float64Array, Gy: Float64Array, lu: number, lv: number): number {
  let before = 0;
  for (let i = 0; i < P * Q; i++) before += image[i];
  // T[u, q] = sum_v C[u, v] Gy[q, v]
  const T = new Float64Array(lu * Q);
  for (let u = 0; u < lu; u++) {
    for (let v = 0; v < lv; v++) {
      const c = C[u * lv + v];
      if (c === 0) continue;
      for (let q = 0; q < Q; q++) T[u * Q + q] += c * Gy[q * lv + v];
    }
  }
  let total = 0;
  for (let p = 0; p < P; p++) {
    for (let u = 0; u < lu; u++) {
      const g = Gx[p * lu + u];
      if (g === 0) continue;
      const row = u * Q;
      for (let q = 0; q < Q; q++) image[p * Q + q] += g * T[row + q];
    }
  }
  for (let i = 0; i < P * Q; i++) total += image[i];
  return total - before;
}

/** T[base + 2q] += (pr + i pi) Wy[q, v] for q = 0 .. Qs - 1 (interleaved complex). */
function addScaledColumn(T: Float64Array, base: number, wyRe: Float64Array, wyIm: Float64Array, v: number, lv: number, Qs: number, pr: number, pi: number): void {
  for (let q = 0, at = v, out = base; q < Qs; q++, at += lv, out += 2) {
    const wr = wyRe[at];
    const wi = wyIm[at];
    T[out] += pr * wr - pi * wi;
    T[out + 1] += pr * wi + pi * wr;
  }
}

/**
 * For every sub-pixel row ps: A[ps, :] = sum_u Wx[ps, u] T[u, :] (only the active u), then
 * |A|^2 summed over the s x s sub-pixels of each pixel, times the sub-pixel area.
 */
function accumulateLayerPower(
  wxRe: Float64Array,
  wxIm: Float64Array,
  T: Float64Array,
  activeU: Int32Array,
  active: number,
  lu: number,
  P: number,
  Q: number,
  s: number,
  cellWeight: number,
  row: Float64Array,
  values: Float64Array,
): void {
  const Qs2 = 2 * Q * s;
  for (let ps = 0; ps < P * s; ps++) {
    row.fill(0);
    const wrow = ps * lu;
    for (let k = 0; k < active; k++) {
      const u = activeU[k];
      const wr = wxRe[wrow + u];
      const wi = wxIm[wrow + u];
      const base = u * Qs2;
      for (let b = 0; b < Qs2; b += 2) {
        const tr = T[base + b];
        const ti = T[base + b + 1];
        row[b] += wr * tr - wi * ti;
        row[b + 1] += wr * ti + wi * tr;
      }
    }
    const out = Math.floor(ps / s) * Q;
    for (let q = 0, b = 0; q < Q; q++) {
      let sum = 0;
      for (let e = 0; e < s; e++, b += 2) sum += row[b] * row[b] + row[b + 1] * row[b + 1];
      values[out + q] += sum * cellWeight;
    }
  }
}

export function freeExpansionImage(field: OrderParameterField, options: FreeExpansionOptions): FreeExpansionImage {
  const { phiRe, phiIm, density, shape } = field;
  const n = gridSizes(shape, 'freeExpansionImage');
  const sites = n[0] * n[1] * n[2];
  if (phiRe.length !== sites || density.length !== sites || (phiIm !== undefined && phiIm.length !== sites)) {
    throw new RangeError(`freeExpansionImage: phi and density must each hold ${sites} values for shape [${shape.join(', ')}]`);
  }
  const { massKg, flightTimeMs, grid, orbitals } = options;
  if (!(massKg > 0) || !Number.isFinite(massKg)) throw new RangeError(`freeExpansionImage: massKg must be positive, got ${massKg}`);
  if (!(flightTimeMs > 0) || !Number.isFinite(flightTimeMs)) {
    throw new RangeError(`freeExpansionImage: flightTimeMs must be positive, got ${flightTimeMs}`);
  }
  const { nx: P, ny: Q, pixelUm } = grid;
  if (!Number.isInteger(P) || !Number.isInteger(Q) || P < 1 || Q < 1 || !(pixelUm > 0)) {
    throw new RangeError(`freeExpansionImage: grid must have positive integer sizes and pixel size, got ${P} x ${Q}, ${pixelUm} um`);
  }
  const axis = options.imagingAxis ?? 2;
  const { lu, lv, su, sv, sl, layers } = columnProjection(n, axis);
  const [au, av] = typeof options.latticeSpacingUm === 'number' ? [options.latticeSpacingUm, options.latticeSpacingUm] : options.latticeSpacingUm;
  const origin = options.originUm ?? { x: (-(lu - 1) * au) / 2, y: (-(lv - 1) * av) / 2 };

  // Peak width of a cloud as wide as the lattice: h t / (m a L) = 2 pi (hbar t / m) / (a L).
  const hbarOverM = hbarOverMassUm2PerMs(massKg);
  const feature = Math.min(
    (2 * Math.PI * hbarOverM * flightTimeMs) / (au * lu),
    (2 * Math.PI * hbarOverM * flightTimeMs) / (av * lv),
  );
  // Automatic sub-sampling stays within a work budget (a very large frame gets fewer samples;
  // the count used is reported).
  const budgetSamples = Math.max(1, Math.floor(Math.sqrt(workBudget / (P * Q * Math.max(lu, lv)))));
  const s = options.subSamplesPerPixel ?? Math.min(defaultSubSamples(pixelUm, feature), budgetSamples);
  if (!Number.isInteger(s) || s < 1 || s > 32) throw new RangeError(`freeExpansionImage: subSamplesPerPixel must be an integer in 1..32, got ${s}`);

  const xs = subPixelCentres(P, grid.firstXUm, pixelUm, s);
  const ys = subPixelCentres(Q, grid.firstYUm, pixelUm, s);
  const Wx = orbitalMatrix(orbitals[0].expand(flightTimeMs, massKg), xs, lu, origin.x, au);
  const Wy = orbitalMatrix(orbitals[1].expand(flightTimeMs, massKg), ys, lv, origin.y, av);
  const sub = pixelUm / s;

  // Incoherent part: column-summed depletion, then Gx D Gy^T.
  const depletion = new Float64Array(lu * lv);
  let atomNumber = 0;
  for (let layer = 0; layer < layers; layer++) {
    for (let u = 0; u < lu; u++) {
      for (let v = 0; v < lv; v++) {
        const i = layer * sl + u * su + v * sv;
        const re = phiRe[i];
        const im = phiIm === undefined ? 0 : phiIm[i];
        depletion[u * lv + v] += density[i] - (re * re + im * im);
        atomNumber += density[i];
      }
    }
  }
  const Gx = pixelDensity(Wx, P, s, lu, sub);
  const Gy = pixelDensity(Wy, Q, s, lv, sub);
  const incoherentImage = new Float64Array(P * Q);
  const incoherentAtoms = addSeparable(incoherentImage, P, Q, Gx, depletion, Gy, lu, lv);

  // Bond coherences along each kept axis.
  const bondImage = new Float64Array(P * Q);
  let bondAtoms = 0;
  const bonds = options.bondCoherence;
  if (bonds !== undefined) {
    if (bonds.alongU.length !== lu * lv || bonds.alongV.length !== lu * lv) {
      throw new RangeError(`freeExpansionImage: bondCoherence arrays must hold ${lu * lv} values (kept axes ${lu} x ${lv})`);
    }
    if (bonds.sumU !== 0) bondAtoms += addSeparable(bondImage, P, Q, pixelBondDensity(Wx, P, s, lu, sub), bonds.alongU, Gy, lu, lv);
    if (bonds.sumV !== 0) bondAtoms += addSeparable(bondImage, P, Q, Gx, bonds.alongV, pixelBondDensity(Wy, Q, s, lv, sub), lu, lv);
  }

  // Coherent part, layer by layer: A = Wx (Phi Wy^T), |A|^2 summed over the s x s sub-pixels.
  const values = new Float64Array(P * Q);
  const Qs = Q * s;
  // T (interleaved re, im): T[u, q] = sum_v phi[u, v] Wy[q, v]; row: one sub-pixel row of A.
  const T = new Float64Array(2 * lu * Qs);
  const row = new Float64Array(2 * Qs);
  const activeU = new Int32Array(lu);
  const cellWeight = sub * sub;
  let coherentLayers = 0;
  for (let layer = 0; layer < layers; layer++) {
    // T[u, q] = sum_v phi[u, v] Wy[q, v]
    T.fill(0);
    let active = 0;
    for (let u = 0; u < lu; u++) {
      let any = false;
      for (let v = 0; v < lv; v++) {
        const i = layer * sl + u * su + v * sv;
        const pr = phiRe[i];
        const pi = phiIm === undefined ? 0 : phiIm[i];
        if (pr === 0 && pi === 0) continue;
        any = true;
        addScaledColumn(T, 2 * u * Qs, Wy.re, Wy.im, v, lv, Qs, pr, pi);
      }
      if (any) activeU[active++] = u;
    }
    if (active === 0) continue;
    coherentLayers++;
    accumulateLayerPower(Wx.re, Wx.im, T, activeU, active, lu, P, Q, s, cellWeight, row, values);
  }
  let coherentAtoms = 0;
  for (let i = 0; i < P * Q; i++) coherentAtoms += values[i];
  let atomsInImage = 0;
  for (let i = 0; i < P * Q; i++) {
    values[i] += incoherentImage[i] + bondImage[i];
    atomsInImage += values[i];
  }
  return {
    values,
    nx: P,
    ny: Q,
    pixelUm,
    xCentresUm: pixelCentresUm(grid.firstXUm, P, pixelUm),
    yCentresUm: pixelCentresUm(grid.firstYUm, Q, pixelUm),
    coherentAtoms,
    incoherentAtoms,
    bondAtoms,
    atomsInImage,
    atomNumber,
    subSamplesPerPixel: s,
    coherentLayers,
  };
}
