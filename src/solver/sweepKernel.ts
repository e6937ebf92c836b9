// The red-black sweep kernel of the site-resolved Gutzwiller self-consistency
// (DESIGN.md section 1). On a bipartite lattice with nearest-neighbour hopping, sites of
// one colour ((x + y + z) even or odd) only touch sites of the other, so updating all sites
// of one colour from the current values of the other is an exact block Gauss-Seidel step:
// it never raises the mean-field energy (T = 0) or grand potential (T > 0), and its result
// does not depend on how the rows are split among threads.
//
// The kernel works on plain Float64Arrays (views on SharedArrayBuffers when workers run
// it) and a per-thread site workspace; it allocates nothing. It runs on contiguous ranges
// of rows of the internal [n0, n1, n2] layout (see latticeGeometry.ts).

import { groundObservables } from './site/groundObservables.js';
import { GroundParameters, solveGround, solveSiteGround } from './site/groundState.js';
import { createSiteObservables, type SiteObservables } from './site/siteObservables.js';
import type { SiteWorkspace } from './site/siteWorkspace.js';
import { solveSiteThermal } from './site/thermalState.js';
import { ThermalSweepParameters, thermalSweepUpdate } from './site/thermalWarmStart.js';
import { couplingNormBound } from './site/weylBound.js';

/** The arrays and constants the kernel reads and writes. */
export interface KernelFields {
  inner: readonly [number, number, number];
  innerPeriodic: readonly [boolean, boolean, boolean];
  nmax: number;
  /** site potential eps_i */
  eps: Float64Array;
  /** per-site U, or null for the uniform value `interactionU` */
  interactionArray: Float64Array | null;
  interactionU: number;
  /** per-bond hopping along each internal axis (bond i -> i + e_axis stored at i), or null */
  hopArrays: readonly [Float64Array | null, Float64Array | null, Float64Array | null];
  /** uniform hopping along each internal axis (used where hopArrays[axis] is null) */
  hopUniform: readonly [number, number, number];
  /** order parameter phi_i = <b_i> (real, >= 0) */
  phi: Float64Array;
  /** last change of phi_i (signed), used by the extrapolation step */
  delta: Float64Array;
  /** last ground energy of each site problem, or a lower bound to it (T = 0 warm start); NaN if none */
  lowerEnergy: Float64Array;
  /** psi_i at which lowerEnergy (T = 0) or the stored spectrum (T > 0) was computed */
  psiPrev: Float64Array;
  /** T > 0: per-site eigenvalues (nmax + 1 per site) at psiPrev, or null */
  spectrum: Float64Array | null;
  /** T > 0: per-site <j|b|j> matching spectrum, or null */
  couplings: Float64Array | null;
}

/** Per-site observables written by the measuring pass. */
export interface MeasureFields {
  density: Float64Array;
  densitySq: Float64Array;
  parityOdd: Float64Array;
  topWeight: Float64Array;
  entropy: Float64Array;
  /** mean field psi_i = sum_j J_ij phi_j */
  psi: Float64Array;
  /** site contribution to the grand potential: Omega_i + psi_i phi_i */
  grandPotential: Float64Array;
}

/** Mean field psi_i = sum over neighbours j of J_ij phi_j at flat index i, coordinates (a, b, c). */
function meanField(f: KernelFields, i: number, a: number, b: number, c: number): number {
  const n0 = f.inner[0];
  const n1 = f.inner[1];
  const n2 = f.inner[2];
  const phi = f.phi;
  let psi = 0;
  if (n2 > 1) {
    const h = f.hopArrays[2];
    const j = f.hopUniform[2];
    if (c + 1 < n2) psi += (h === null ? j : h[i]) * phi[i + 1];
    else if (f.innerPeriodic[2]) psi += (h === null ? j : h[i]) * phi[i - n2 + 1];
    if (c > 0) psi += (h === null ? j : h[i - 1]) * phi[i - 1];
    else if (f.innerPeriodic[2]) psi += (h === null ? j : h[i + n2 - 1]) * phi[i + n2 - 1];
  }
  if (n1 > 1) {
    const h = f.hopArrays[1];
    const j = f.hopUniform[1];
    const s = n2;
    const wrap = (n1 - 1) * s;
    if (b + 1 < n1) psi += (h === null ? j : h[i]) * phi[i + s];
    else if (f.innerPeriodic[1]) psi += (h === null ? j : h[i]) * phi[i - wrap];
    if (b > 0) psi += (h === null ? j : h[i - s]) * phi[i - s];
    else if (f.innerPeriodic[1]) psi += (h === null ? j : h[i + wrap]) * phi[i + wrap];
  }
  if (n0 > 1) {
    const h = f.hopArrays[0];
    const j = f.hopUniform[0];
    const s = n1 * n2;
    const wrap = (n0 - 1) * s;
    if (a + 1 < n0) psi += (h === null ? j : h[i]) * phi[i + s];
    else if (f.innerPeriodic[0]) psi += (h === null ? j : h[i]) * phi[i - wrap];
    if (a > 0) psi += (h === null ? j : h[i - s]) * phi[i - s];
    else if (f.innerPeriodic[0]) psi += (h === null ? j : h[i + wrap]) * phi[i + wrap];
  }
  return psi;
}

// Argument records of the site solvers, one per thread (this module is loaded per worker).
const groundArgs = new GroundParameters();
const thermalArgs = new ThermalSweepParameters();

/**
 * Update every site of one colour in rows [rowStart, rowEnd). Returns max |delta phi|.
 * temperature <= 0: ground state with warm-started eigenvalue search; > 0: thermal state.
 */
export function sweepColour(
  f: KernelFields,
  ws: SiteWorkspace,
  colour: number,
  rowStart: number,
  rowEnd: number,
  mu: number,
  temperature: number,
): number {
  const n0 = f.inner[0];
  const n1 = f.inner[1];
  const n2 = f.inner[2];
  const s0 = n1 * n2;
  const eps = f.eps;
  const uArr = f.interactionArray;
  const uUni = f.interactionU;
  const phi = f.phi;
  const delta = f.delta;
  const lower = f.lowerEnergy;
  const psiPrev = f.psiPrev;
  const ground = groundArgs;
  const thermalUpdate = thermalArgs;
  const spectrum = f.spectrum;
  const couplings = f.couplings;
  const states = f.nmax + 1;
  const coupling = couplingNormBound(f.nmax);
  const thermal = temperature > 0;
  const h0 = f.hopArrays[0];
  const h1 = f.hopArrays[1];
  const h2 = f.hopArrays[2];
  const uniformHopping = h0 === null && h1 === null && h2 === null;
  const j0 = f.hopUniform[0];
  const j1 = f.hopUniform[1];
  const j2 = f.hopUniform[2];
  const p0 = f.innerPeriodic[0];
  const p1 = f.innerPeriodic[1];
  const p2 = f.innerPeriodic[2];
  let maxChange = 0;
  for (let row = rowStart; row < rowEnd; row++) {
    const a = (row / n1) | 0;
    const b = row - a * n1;
    const base = row * n2;
    // Neighbour offsets of this row along the two outer axes; a missing neighbour (open
    // edge, or an axis of length 1) gets offset 0 and weight 0.
    const up0 = a + 1 < n0 ? s0 : p0 && n0 > 1 ? -(n0 - 1) * s0 : 0;
    const dn0 = a > 0 ? -s0 : p0 && n0 > 1 ? (n0 - 1) * s0 : 0;
    const wu0 = a + 1 < n0 || (p0 && n0 > 1) ? 1 : 0;
    const wd0 = a > 0 || (p0 && n0 > 1) ? 1 : 0;
    const up1 = b + 1 < n1 ? n2 : p1 && n1 > 1 ? -(n1 - 1) * n2 : 0;
    const dn1 = b > 0 ? -n2 : p1 && n1 > 1 ? (n1 - 1) * n2 : 0;
    const wu1 = b + 1 < n1 || (p1 && n1 > 1) ? 1 : 0;
    const wd1 = b > 0 || (p1 && n1 > 1) ? 1 : 0;
    for (let c = (a + b + colour) & 1; c < n2; c += 2) {
      const i = base + c;
      // Along the row (innermost axis).
      const up2 = c + 1 < n2 ? 1 : p2 && n2 > 1 ? -(n2 - 1) : 0;
      const dn2 = c > 0 ? -1 : p2 && n2 > 1 ? n2 - 1 : 0;
      const wu2 = up2 === 0 ? 0 : 1;
      const wd2 = dn2 === 0 ? 0 : 1;
      let psi: number;
      if (uniformHopping) {
        psi =
          j0 * (wu0 * phi[i + up0] + wd0 * phi[i + dn0]) +
          j1 * (wu1 * phi[i + up1] + wd1 * phi[i + dn1]) +
          j2 * (wu2 * phi[i + up2] + wd2 * phi[i + dn2]);
      } else {
        // Bond from i to i + e is stored at i; the bond to i - e at the neighbour's index.
        psi =
          wu0 * (h0 === null ? j0 : h0[i]) * phi[i + up0] +
          wd0 * (h0 === null ? j0 : h0[i + dn0]) * phi[i + dn0] +
          wu1 * (h1 === null ? j1 : h1[i]) * phi[i + up1] +
          wd1 * (h1 === null ? j1 : h1[i + dn1]) * phi[i + dn1] +
          wu2 * (h2 === null ? j2 : h2[i]) * phi[i + up2] +
          wd2 * (h2 === null ? j2 : h2[i + dn2]) * phi[i + dn2];
      }
      const u = uArr === null ? uUni : uArr[i];
      let phiNew: number;
      if (thermal) {
        if (spectrum !== null && couplings !== null) {
          thermalUpdate.interactionU = u;
          thermalUpdate.muLocal = mu - eps[i];
          thermalUpdate.psi = psi;
          thermalUpdate.psiChange = psi - psiPrev[i];
          thermalUpdate.temperature = temperature;
          thermalSweepUpdate(ws, thermalUpdate, spectrum, couplings, i * states);
          phiNew = ws.phi;
          psiPrev[i] = psi;
        } else {
          phiNew = solveSiteThermal(ws, u, mu - eps[i], psi, temperature, null);
        }
      } else {
        // Weyl: lambda(psi) >= lambda(psiPrev) - |psi - psiPrev| ||b + b^+|| is a safe start;
        // Hellmann-Feynman, d lambda/d psi = -2 phi, gives a much closer estimate.
        const prev = lower[i];
        const dPsi = psi - psiPrev[i];
        const bound = prev === prev ? prev - Math.abs(dPsi) * coupling - 1e-12 * (Math.abs(prev) + u) : NaN;
        const estimate = prev === prev ? prev - 2 * phi[i] * dPsi : NaN;
        ground.interactionU = u;
        ground.muLocal = mu - eps[i];
        ground.psi = psi;
        ground.lowerBound = bound;
        ground.estimate = estimate;
        solveGround(ws, ground);
        phiNew = ws.phi;
        lower[i] = ws.eigenvalues[0];
        psiPrev[i] = psi;
      }
      const change = phiNew - phi[i];
      delta[i] = change;
      phi[i] = phiNew;
      const absChange = change < 0 ? -change : change;
      if (absChange > maxChange) maxChange = absChange;
    }
  }
  return maxChange;
}

const measureScratch: SiteObservables = createSiteObservables();

/**
 * Observables of every site in rows [rowStart, rowEnd) for the current phi, without
 * changing phi. The site state is the one selected by the current mean field psi_i. The
 * T = 0 search starts cold (Gershgorin): a warm start would give the same eigenpair only to
 * rounding, and the measured atom number steers the mu search.
 */
export function measureRows(
  f: KernelFields,
  m: MeasureFields,
  ws: SiteWorkspace,
  rowStart: number,
  rowEnd: number,
  mu: number,
  temperature: number,
): void {
  const n1 = f.inner[1];
  const n2 = f.inner[2];
  const out = measureScratch;
  for (let row = rowStart; row < rowEnd; row++) {
    const a = (row / n1) | 0;
    const b = row - a * n1;
    const base = row * n2;
    for (let c = 0; c < n2; c++) {
      const i = base + c;
      const psi = meanField(f, i, a, b, c);
      const u = f.interactionArray === null ? f.interactionU : f.interactionArray[i];
      if (temperature > 0) {
        solveSiteThermal(ws, u, mu - f.eps[i], psi, temperature, out);
      } else {
        groundObservables(ws, solveSiteGround(ws, u, mu - f.eps[i], psi, NaN), out);
      }
      m.density[i] = out.density;
      m.densitySq[i] = out.densitySq;
      m.parityOdd[i] = out.parityOdd;
      m.topWeight[i] = out.topWeight;
      m.entropy[i] = out.entropy;
      m.psi[i] = psi;
      // Omega = sum_i (Omega_i + psi_i phi_i), with phi_i the current field (DESIGN.md section 1).
      m.grandPotential[i] = out.energy + psi * f.phi[i];
    }
  }
}
