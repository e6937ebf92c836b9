// Site-resolved Hubbard parameters of one lattice axis under a combined potential
//     V(x) = s1 E_r sin^2(k1 x) + sum_t V_t sin^2(pi x / P_t + phi_t)
// (a main standing wave of depth s1 in its own recoil energy E_r = hbar^2 k1^2 / 2m, plus one
// or more further standing waves of amplitude V_t (in E_r), period P_t lattice sites and
// phase phi_t; x in lattice sites from site 0). Commensurate or not, slowly varying or not:
// no local-depth approximation is made.
//
// Method. The lowest band of the combined potential is one state per well as long as the
// extra terms leave the band gap of the main lattice open. On a window of W wells (hard walls
// at the main lattice's maxima, W = core + 2 margin) the Hamiltonian -d^2/dxi^2 + V(xi), xi =
// k1 x, is discretised by second-order finite differences (P points per site; tridiagonal)
// and its W lowest eigenstates give the band subspace (tridiagonalLowestSubspace.ts).
// In one dimension the maximally localised Wannier functions of a band subspace are the
// eigenfunctions of the position operator projected onto it (Kivelson, PRB 26, 4269 (1982);
// Marzari et al., Rev. Mod. Phys. 84, 1419 (2012), sec. II.E), which is what is done here,
// W x W, with ml-matrix. Then, for the core sites of the window,
//     J_(i,i+1) = -<w_i|H|w_(i+1)>,  eps_i = <w_i|H|w_i>,  int |w_i|^4 dx,
// and the window slides by its core. Wannier functions decay exponentially, so the hard
// walls affect the core only through exponentially small tails (the margin grows as the
// lattice gets shallower; its effect is measured in the tests).
//
// Accuracy: the finite-difference error is O(h^2) in every matrix element, removed to
// O(h^4) by Richardson extrapolation between P and 2P points per site (the error expansion
// of a second-order difference operator with a smooth potential is in even powers of h).
// Checked in test/physics/combinedLattice.test.ts against the plane-wave band calculation of
// bandStructure.ts / wannier.ts (uniform lattice) and against an independent plane-wave
// supercell calculation (commensurate superlattice).
//
// Validity: single band (the lowest band group must be separated from the next by a gap; the
// result carries the smallest gap found and the largest shift of a Wannier centre from its
// well, and refuses when the band is no longer one state per well); nearest-neighbour
// hopping (the largest |J_(i,i+2) / J_(i,i+1)| is returned so callers can warn).

import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { tridiagonalLowestSubspace } from '../numerics/tridiagonalLowestSubspace.js';
import { maxAxisDepthEr, minAxisDepthEr } from './latticeAxis.js';
import { ParameterError, requireFiniteInRange } from './parameterError.js';

export interface ExtraStandingWave {
  /** amplitude V_t in recoil energies of the main lattice (>= 0) */
  amplitudeEr: number;
  /** period of sin^2 in lattice sites (= wavelength_t / wavelength_main for collinear beams) */
  periodSites: number;
  /** phase phi_t in radians; the term is V_t sin^2(pi x / P_t + phi_t), x in sites from site 0 */
  phaseRad: number;
}

export interface CombinedAxisInput {
  /** depth of the main lattice, E_r */
  depthEr: number;
  /** sites along the axis */
  siteCount: number;
  /** a periodic axis sees the potential repeated with period siteCount sites */
  periodic: boolean;
  extra: readonly ExtraStandingWave[];
  /** grid points per site of the coarser of the two Richardson grids (default 32 to 64, from the depth) */
  pointsPerSite?: number;
  /** sites solved per window (default 16) */
  coreSites?: number;
  /** wells added on each side of the core (default from the depth, see marginFor) */
  marginSites?: number;
}

export interface CombinedAxisResult {
  /** J of the bond from site i to i + 1 (index i; on an open axis the last entry is unused), E_r */
  hoppingEr: Float64Array;
  /** on-site energy <w_i|H|w_i> minus that of the main lattice alone, E_r */
  onsiteShiftEr: Float64Array;
  /** int |w_i|^4 dx in units of 1/a */
  integralW4PerSite: Float64Array;
  /** the same quantities for the main lattice alone, by the same method (E_r, 1/a) */
  reference: { hoppingEr: number; onsiteEr: number; integralW4PerSite: number };
  /** largest |J_(i,i+2)| / J_(i,i+1) */
  nextNearestRatioMax: number;
  /** smallest gap between the lowest band group and the next state over all windows, E_r */
  bandGapMinEr: number;
  /** largest |Wannier centre - site position|, sites */
  centreShiftMaxSites: number;
  /** largest subspace residual of the eigen-solver, E_r */
  residualMaxEr: number;
  /**
   * <w_i|H|w_(i+r)> for r = 0..couplingRange at index i * (couplingRange + 1) + r, E_r (r = 0:
   * the full on-site energy): the longer-range terms the nearest-neighbour model leaves out,
   * for checks and warnings.
   */
  couplingsEr: Float64Array;
  couplingRange: number;
}

/** Range of the couplings returned in couplingsEr. */
export const couplingRange = 5;

/** Wells of margin on each side of a window: Wannier tails fall off faster in deeper lattices. */
export function marginFor(depthEr: number): number {
  return depthEr >= 8 ? 8 : depthEr >= 4 ? 10 : depthEr >= 2 ? 14 : 20;
}

/** Position (in sites) where the potential is evaluated: a periodic axis wraps onto [-1/2, N - 1/2). */
function wrap(xSites: number, siteCount: number, periodic: boolean): number {
  if (!periodic) return xSites;
  const shifted = xSites + 0.5;
  return shifted - siteCount * Math.floor(shifted / siteCount) - 0.5;
}

interface WindowResult {
  /** h_ij of the W Wannier functions (W x W), E_r */
  hamiltonian: Float64Array;
  integralW4: Float64Array;
  /** Wannier centre minus well position, sites */
  centres: Float64Array;
  gapEr: number;
  residual: number;
}

/**
 * Wannier functions of the wells firstSite .. firstSite + W - 1 on a grid of P points per
 * site. Returns the Wannier Hamiltonian in the order of the wells.
 */
function solveWindow(input: CombinedAxisInput, firstSite: number, wells: number, pointsPerSite: number): WindowResult {
  const P = pointsPerSite;
  const G = wells * P - 1;
  const hXi = Math.PI / P;
  const kinetic = 1 / (hXi * hXi);
  const diag = new Float64Array(G);
  const off = new Float64Array(G - 1);
  const xSites = new Float64Array(G);
  const left = firstSite - 0.5;
  const s1 = input.depthEr;
  const extra = input.extra;
  for (let k = 0; k < G; k++) {
    const x = left + (k + 1) / P;
    xSites[k] = x;
    const s = Math.sin(Math.PI * x);
    let v = s1 * s * s;
    const xw = wrap(x, input.siteCount, input.periodic);
    for (let t = 0; t < extra.length; t++) {
      const e = Math.sin((Math.PI * xw) / extra[t].periodSites + extra[t].phaseRad);
      v += extra[t].amplitudeEr * e * e;
    }
    diag[k] = 2 * kinetic + v;
    if (k < G - 1) off[k] = -kinetic;
  }
  const sub = tridiagonalLowestSubspace(diag, off, wells);
  const V = sub.vectors;
  // Projected position operator X_ab = sum_k v_a(k) x_k v_b(k).
  const X = new Matrix(wells, wells);
  for (let a = 0; a < wells; a++) {
    for (let b = a; b < wells; b++) {
      let s = 0;
      for (let k = 0; k < G; k++) s += V[a * G + k] * xSites[k] * V[b * G + k];
      X.set(a, b, s);
      X.set(b, a, s);
    }
  }
  const evd = new EigenvalueDecomposition(X, { assumeSymmetric: true });
  const order = evd.realEigenvalues.map((c, j) => ({ c, j })).sort((p, q) => p.c - q.c);
  const U = evd.eigenvectorMatrix;
  // Wannier functions on the grid, sign fixed so that w_i is positive at its centre.
  const w = new Float64Array(wells * G);
  const centres = new Float64Array(wells);
  const sign = new Float64Array(wells);
  const integralW4 = new Float64Array(wells);
  for (let i = 0; i < wells; i++) {
    const col = order[i].j;
    centres[i] = order[i].c - (firstSite + i);
    for (let a = 0; a < wells; a++) {
      const u = U.get(a, col);
      const base = a * G;
      for (let k = 0; k < G; k++) w[i * G + k] += u * V[base + k];
    }
    const at = Math.min(G - 1, Math.max(0, Math.round((order[i].c - left) * P) - 1));
    sign[i] = w[i * G + at] < 0 ? -1 : 1;
    let s4 = 0;
    for (let k = 0; k < G; k++) {
      const d = w[i * G + k] * w[i * G + k];
      s4 += d * d;
    }
    // Grid vectors are normalised as sum w_k^2 = 1, i.e. w(x) = w_k / sqrt(h) with h = 1/P sites.
    integralW4[i] = s4 * P;
  }
  // h = U^T (V^T T V) U in the Wannier order, with the signs applied.
  const T = sub.projected;
  const hamiltonian = new Float64Array(wells * wells);
  const tmp = new Float64Array(wells);
  for (let i = 0; i < wells; i++) {
    const ci = order[i].j;
    for (let b = 0; b < wells; b++) {
      let s = 0;
      for (let a = 0; a < wells; a++) s += U.get(a, ci) * T[a * wells + b];
      tmp[b] = s;
    }
    for (let j = 0; j < wells; j++) {
      const cj = order[j].j;
      let s = 0;
      for (let b = 0; b < wells; b++) s += tmp[b] * U.get(b, cj);
      hamiltonian[i * wells + j] = s * sign[i] * sign[j];
    }
  }
  return { hamiltonian, integralW4, centres, gapEr: sub.nextEigenvalue - sub.eigenvalues[wells - 1], residual: sub.residual };
}

/** Richardson extrapolation of a quantity with an O(h^2) error from grids h and h/2. */
function richardson(coarse: number, fine: number): number {
  return (4 * fine - coarse) / 3;
}

interface ExtrapolatedWindow {
  hamiltonian: Float64Array;
  integralW4: Float64Array;
  centres: Float64Array;
  gapEr: number;
  residual: number;
}

function extrapolatedWindow(input: CombinedAxisInput, firstSite: number, wells: number, P: number): ExtrapolatedWindow {
  const a = solveWindow(input, firstSite, wells, P);
  const b = solveWindow(input, firstSite, wells, 2 * P);
  const hamiltonian = new Float64Array(a.hamiltonian.length);
  for (let i = 0; i < hamiltonian.length; i++) hamiltonian[i] = richardson(a.hamiltonian[i], b.hamiltonian[i]);
  const integralW4 = new Float64Array(wells);
  for (let i = 0; i < wells; i++) integralW4[i] = richardson(a.integralW4[i], b.integralW4[i]);
  return { hamiltonian, integralW4, centres: b.centres, gapEr: Math.min(a.gapEr, b.gapEr), residual: Math.max(a.residual, b.residual) };
}

/** Site-resolved J, on-site energy and int |w|^4 along one axis (see the file header). */
export function combinedLatticeAxis(input: CombinedAxisInput): CombinedAxisResult {
  requireFiniteInRange('depthEr', input.depthEr, minAxisDepthEr, maxAxisDepthEr, 'recoil energies (E_r) of the main lattice');
  const N = input.siteCount;
  if (!Number.isInteger(N) || N < 1) throw new ParameterError('siteCount', `expected an integer >= 1, got ${N}`);
  input.extra.forEach((t, k) => {
    requireFiniteInRange(`extra[${k}].amplitudeEr`, t.amplitudeEr, 0, 400, 'E_r');
    if (!(t.periodSites > 0) || !Number.isFinite(t.periodSites)) {
      throw new ParameterError(`extra[${k}].periodSites`, `expected a positive period in sites, got ${t.periodSites}`);
    }
    if (!Number.isFinite(t.phaseRad)) throw new ParameterError(`extra[${k}].phaseRad`, `expected a finite phase, got ${t.phaseRad}`);
  });
  // Narrower wells need finer grids: measured Richardson errors of J ~1e-5 relative at
  // (10 E_r, 32), (25 E_r, 48) and below 2e-5 up to 200 E_r at 64 points per site.
  const P = input.pointsPerSite ?? (input.depthEr <= 12 ? 32 : input.depthEr <= 40 ? 48 : 64);
  const margin0 = input.marginSites ?? marginFor(input.depthEr);
  if (!Number.isInteger(margin0) || margin0 < couplingRange + 1) {
    throw new ParameterError('marginSites', `expected an integer >= ${couplingRange + 1}, got ${margin0}`);
  }
  const core = Math.min(input.coreSites ?? 16, N);
  const margin = margin0;
  const wells = core + 2 * margin;

  // The main lattice alone, by the same method: its J, on-site energy and int|w|^4 are the
  // reference the shifts are measured from (and a built-in check of the discretisation).
  const uniform = extrapolatedWindow({ ...input, extra: [] }, -margin, wells, P);
  const mid = margin;
  const reference = {
    hoppingEr: -uniform.hamiltonian[mid * wells + mid + 1],
    onsiteEr: uniform.hamiltonian[mid * wells + mid],
    integralW4PerSite: uniform.integralW4[mid],
  };

  const hoppingEr = new Float64Array(N);
  const couplingsEr = new Float64Array(N * (couplingRange + 1));
  const onsiteShiftEr = new Float64Array(N);
  const integralW4PerSite = new Float64Array(N);
  let nextNearestRatioMax = 0;
  let bandGapMinEr = uniform.gapEr;
  let centreShiftMaxSites = 0;
  let residualMaxEr = uniform.residual;
  // Windows whose potential is the same up to a whole number of periods of every term (a
  // commensurate superlattice) are solved once.
  const cache = new Map<string, ExtrapolatedWindow>();
  for (let start = 0; start < N; start += core) {
    const count = Math.min(core, N - start);
    const first = start - margin;
    const crossesSeam = input.periodic && (first < 0 || first + wells > N);
    const key = crossesSeam
      ? `seam ${start}`
      : input.extra.map((t) => (((first / t.periodSites + t.phaseRad / Math.PI) % 1) + 1) % 1).map((f) => (f > 1 - 1e-12 ? 0 : f).toFixed(12)).join(' ');
    let win = cache.get(key);
    if (!win) {
      win = extrapolatedWindow(input, first, wells, P);
      cache.set(key, win);
    }
    bandGapMinEr = Math.min(bandGapMinEr, win.gapEr);
    residualMaxEr = Math.max(residualMaxEr, win.residual);
    for (let c = 0; c < count; c++) {
      const i = margin + c;
      const site = start + c;
      const shift = Math.abs(win.centres[i]);
      if (shift > centreShiftMaxSites) centreShiftMaxSites = shift;
      const h = win.hamiltonian;
      hoppingEr[site] = -h[i * wells + i + 1];
      onsiteShiftEr[site] = h[i * wells + i] - reference.onsiteEr;
      integralW4PerSite[site] = win.integralW4[i];
      for (let r = 0; r <= couplingRange; r++) couplingsEr[site * (couplingRange + 1) + r] = h[i * wells + i + r];
      const ratio = Math.abs(h[i * wells + i + 2] / h[i * wells + i + 1]);
      if (ratio > nextNearestRatioMax) nextNearestRatioMax = ratio;
    }
  }
  if (centreShiftMaxSites > 0.35) {
    throw new ParameterError(
      'extra',
      `the lowest band of the combined lattice is no longer one state per well (a Wannier centre lies ${centreShiftMaxSites.toFixed(2)} sites from its well); ` +
        'make the second lattice weaker or the main lattice deeper',
    );
  }
  return {
    hoppingEr,
    onsiteShiftEr,
    integralW4PerSite,
    reference,
    nextNearestRatioMax,
    bandGapMinEr,
    centreShiftMaxSites,
    residualMaxEr,
    couplingsEr,
    couplingRange,
  };
}
