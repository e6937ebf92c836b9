// The homogeneous mean-field phase map in the (zJ/U, mu/U) plane and the Mott-lobe
// boundaries (Sheshadri et al., EPL 22, 257 (1993); van Oosten, van der Straten & Stoof,
// PRA 63, 053601 (2001)). Energies in units of U.
//
// The superfluid edge is where the linear response of the site problem balances the
// hopping, zJ chi(mu, T) = 1 (continuous transition), so the boundary is traced directly
// as zJ_c(mu) = 1/chi(mu, T) instead of being read off the grid: at T = 0 this is the lobe
// boundary of filling n for n - 1 < mu/U < n; at T > 0 it is the edge between the
// superfluid and the normal fluid (the lobes themselves are no longer insulating).
//
// Lobe tips: the sampled curve only brackets the maximum of zJ_c(mu) = 1/chi(mu) (its top is
// flat, so the best sample is off by the sample spacing, ~1e-3 in mu/U). The tip is then
// root-found as the zero of d chi/d mu, with chi and its derivative in closed form
// (atomicSusceptibility in homogeneous.ts), by Brent's method to 1e-13 in mu/U. At T = 0
// this reproduces mu/U = sqrt(n(n+1)) - 1, zJ/U = 2n + 1 - 2 sqrt(n(n+1)) (van Oosten et al.).

import { atomicSusceptibility, homogeneousPhi, siteSusceptibility } from './homogeneous.js';
import { brentRoot } from '../numerics/brentRoot.js';
import { createSiteObservables, createSiteWorkspace, solveSite } from './site/index.js';

export interface PhaseMapRequest {
  zJMax: number;
  muMin: number;
  muMax: number;
  /** grid points along zJ/U */
  columns: number;
  /** grid points along mu/U */
  rows: number;
  /** k_B T / U */
  temperature: number;
  nmax: number;
  /** points per boundary curve */
  boundaryPoints: number;
}

export interface LobeBoundary {
  filling: number;
  mu: Float64Array;
  zJ: Float64Array;
  /** largest zJ/U of the boundary and where it occurs (root-found, see the file header) */
  tipZJ: number;
  tipMu: number;
  /** true when the tip was root-found; false when the maximum sits at an end of the interval */
  tipRefined: boolean;
}

export interface PhaseMapResult {
  zJ: Float64Array;
  mu: Float64Array;
  /** value at (column c, row r) stored at c * rows + r */
  orderParameter: Float64Array;
  density: Float64Array;
  boundaries: LobeBoundary[];
  /** largest weight on |nmax> anywhere on the grid */
  maxTopWeight: number;
}

export function phaseMap(req: PhaseMapRequest, onRow?: (fraction: number) => void): PhaseMapResult {
  const { columns, rows, zJMax, muMin, muMax, temperature, nmax } = req;
  const ws = createSiteWorkspace(nmax);
  const scratch = createSiteObservables();
  const obs = createSiteObservables();
  const zJ = new Float64Array(columns);
  const mu = new Float64Array(rows);
  for (let c = 0; c < columns; c++) zJ[c] = columns === 1 ? 0 : (zJMax * c) / (columns - 1);
  for (let r = 0; r < rows; r++) mu[r] = rows === 1 ? muMin : muMin + ((muMax - muMin) * r) / (rows - 1);
  const orderParameter = new Float64Array(columns * rows);
  const density = new Float64Array(columns * rows);
  let maxTop = 0;
  for (let c = 0; c < columns; c++) {
    for (let r = 0; r < rows; r++) {
      const input = { zJ: zJ[c], interactionU: 1, mu: mu[r], temperature, nmax };
      const phi = homogeneousPhi(ws, input, scratch);
      solveSite(ws, 1, mu[r], zJ[c] * phi, temperature, obs);
      orderParameter[c * rows + r] = phi;
      density[c * rows + r] = obs.density;
      if (obs.topWeight > maxTop) maxTop = obs.topWeight;
    }
    onRow?.((c + 1) / columns);
  }
  const boundaries: LobeBoundary[] = [];
  const chiScratch = new Float64Array(nmax + 1);
  // Filling 0 is the empty lattice (mu < 0), whose edge is zJ = -mu.
  const firstFilling = Math.max(0, Math.floor(muMin) + 1);
  for (let n = firstFilling; n - 1 < muMax && n < nmax; n++) {
    const lo = n === 0 ? muMin : Math.max(n - 1, muMin);
    const hi = Math.min(n, muMax);
    if (!(hi > lo)) continue;
    const count = req.boundaryPoints;
    const muCurve = new Float64Array(count);
    const zCurve = new Float64Array(count);
    let tipZ = 0;
    let tipMu = lo;
    let tipK = 0;
    for (let k = 0; k < count; k++) {
      // Cosine spacing crowds points toward the integer ends, where the curve is steep.
      const t = 0.5 - 0.5 * Math.cos((Math.PI * (k + 0.5)) / count);
      const m = lo + (hi - lo) * t;
      const chi = siteSusceptibility(ws, 1, m, temperature, scratch);
      muCurve[k] = m;
      zCurve[k] = 1 / chi;
      if (zCurve[k] > tipZ) {
        tipZ = zCurve[k];
        tipMu = m;
        tipK = k;
      }
    }
    const tip = refineTip(muCurve, tipK, lo, hi, temperature, nmax, chiScratch);
    if (tip !== null) {
      tipMu = tip.mu;
      tipZ = tip.zJ;
    }
    boundaries.push({ filling: n, mu: muCurve, zJ: zCurve, tipZJ: tipZ, tipMu, tipRefined: tip !== null });
  }
  return { zJ, mu, orderParameter, density, boundaries, maxTopWeight: maxTop };
}

/**
 * The maximum of zJ_c = 1/chi between the samples next to the best one: the zero of
 * d chi / d mu (chi has a minimum there), by Brent's method. Null when the derivative does
 * not change sign in that bracket (the maximum is at an end of the interval, e.g. at T > 0
 * once the lobes have merged), so the sampled maximum stands.
 */
function refineTip(
  muCurve: Float64Array,
  best: number,
  lo: number,
  hi: number,
  temperature: number,
  nmax: number,
  scratch: Float64Array,
): { mu: number; zJ: number } | null {
  const a = best > 0 ? muCurve[best - 1] : lo;
  const b = best < muCurve.length - 1 ? muCurve[best + 1] : hi;
  const slope = (m: number): number => atomicSusceptibility(1, m, temperature, nmax, scratch).dChiDmu;
  // Stay strictly inside (lo, hi): at an integer mu/U the T = 0 response diverges.
  const inset = 1e-12 * (hi - lo);
  const left = Math.max(a, lo + inset);
  const right = Math.min(b, hi - inset);
  const fLeft = slope(left);
  const fRight = slope(right);
  if (!(fLeft < 0 && fRight > 0)) return null;
  const root = brentRoot(slope, left, right, fLeft, fRight, 1e-14, 0, 200);
  if (!root.converged) return null;
  return { mu: root.root, zJ: 1 / atomicSusceptibility(1, root.root, temperature, nmax, scratch).chi };
}
