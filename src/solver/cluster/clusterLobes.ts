// Mott-lobe boundaries of uniform cluster mean-field theory for the Bose-Hubbard model on
// the chain, square or cubic lattice (energies in units of U).
//
// Criterion. phi = 0 solves the self-consistency for every J; it becomes unstable where the
// linearised map phi -> J chi A phi has spectral radius 1, J lambda(J, mu) = 1 (mottResponse.ts;
// Buonsante, Penna & Vezzani, Laser Phys. 15, 361 (2005)). The transition of this model
// is continuous, so the onset of phi is the boundary; a test confirms it against the
// self-consistent solution (homogeneousCluster.ts). lambda depends on J through the exact
// hopping inside the cluster, so J_c(mu) is the root of J lambda(J) - 1, found with Brent's
// method. At T = 0 the cluster can also leave the Mott sector by a level crossing before
// the instability; the boundary is then the crossing (reported as kind 'levelCrossing').
// At T > 0 there is no Mott sector; lambda comes from the thermal cluster state by a
// symmetric finite difference of phi in a small field (phi is odd in Psi, so the error is
// O(delta^2) relative), and J_c is the superfluid - normal-fluid edge.
//
// The lobe tip is the largest J_c over n - 1 < mu/U < n, found by golden-section search.
// For the single-site cluster this reproduces zJ_c/U = (n - x)(x - n + 1)/(1 + x),
// x = mu/U (van Oosten, van der Straten & Stoof, PRA 63, 053601 (2001)).

import { ParameterError } from '../../physics/parameterError.js';
import { brentRoot } from '../../numerics/brentRoot.js';
import { goldenSectionMaximum } from '../../numerics/goldenSection.js';
import { createClusterSolver, solveClusterThermal, type ClusterSolver } from './clusterSolver.js';
import { createMottResponseWorkspace, mottResponse, type MottResponseWorkspace } from './mottResponse.js';

export interface LobeWorkspace {
  readonly shape: readonly number[];
  readonly nmax: number;
  readonly filling: number;
  readonly mott: MottResponseWorkspace;
  /** full-space solver for T > 0, created on first use */
  thermal: ClusterSolver | null;
  readonly x: Float64Array;
}

export function createLobeWorkspace(shape: readonly number[], nmax: number, filling: number): LobeWorkspace {
  if (!Number.isInteger(filling) || filling < 1) throw new ParameterError('filling', `expected a Mott lobe n >= 1, got ${filling}`);
  const mott = createMottResponseWorkspace(shape, nmax, filling);
  return { shape: [...shape], nmax, filling, mott, thermal: null, x: new Float64Array(mott.geometry.siteCount) };
}

export interface CriticalHopping {
  /** J_c / U */
  hoppingOverU: number;
  /** z J_c / U with z = 2 * dims */
  zJOverU: number;
  kind: 'instability' | 'levelCrossing';
  converged: boolean;
  /** evaluations of lambda */
  evaluations: number;
}

/** Perron root of the thermal linear response chi A at (J, mu, kT), U = 1, by finite differences. */
export function thermalResponseEigenvalue(ws: LobeWorkspace, hopping: number, muOverU: number, temperatureOverU: number): { eigenvalue: number; converged: boolean } {
  ws.thermal ??= createClusterSolver(ws.shape, ws.nmax);
  const solver = ws.thermal;
  const h = solver.hamiltonian;
  const g = solver.geometry;
  h.interactionU.fill(1);
  h.muLocal.fill(muOverU);
  h.bondHopping.fill(hopping);
  const x = ws.x;
  x.fill(1);
  const delta = 1e-5;
  let eigenvalue = NaN;
  let converged = true;
  for (let it = 0; it < 300; it++) {
    let vmax = 0;
    for (let k = 0; k < g.siteCount; k++) {
      let s = 0;
      for (let e = g.externalStart[k]; e < g.externalStart[k + 1]; e++) s += x[g.externalImage[e]];
      h.fieldPsi[k] = s;
      if (s > vmax) vmax = s;
    }
    // Field amplitude delta on the largest component: small enough for O(delta^2) errors.
    const amp = delta / (vmax > 0 ? vmax : 1);
    for (let k = 0; k < g.siteCount; k++) h.fieldPsi[k] *= amp;
    const out = solveClusterThermal(solver, temperatureOverU, null);
    converged = converged && out.converged;
    let lo = Infinity;
    let hi = 0;
    let top = 0;
    for (let i = 0; i < g.siteCount; i++) {
      const y = out.phi[i] / amp;
      const ratio = y / x[i];
      if (ratio < lo) lo = ratio;
      if (ratio > hi) hi = ratio;
      if (y > top) top = y;
    }
    eigenvalue = 0.5 * (lo + hi);
    if (!(top > 0)) break;
    for (let i = 0; i < g.siteCount; i++) x[i] = out.phi[i] / amp / top;
    if (hi - lo <= 1e-10 * hi) break;
  }
  return { eigenvalue, converged };
}

/** Single-site boundary zJ_c/U for filling n at x = mu/U (a first guess for the bracket). */
function singleSiteZJ(n: number, x: number): number {
  return ((n - x) * (x - n + 1)) / (1 + x);
}

/**
 * Critical hopping J_c/U at mu/U for the lobe of `ws.filling` (T = 0) or the superfluid
 * edge at kT/U > 0. `guess` (J/U) speeds up the bracket (e.g. the neighbour on a curve).
 */
export function clusterCriticalHopping(ws: LobeWorkspace, muOverU: number, temperatureOverU = 0, guess = NaN): CriticalHopping {
  const n = ws.filling;
  if (temperatureOverU === 0 && !(muOverU > n - 1 && muOverU < n)) {
    throw new ParameterError('muOverU', `the lobe n = ${n} spans ${n - 1} < mu/U < ${n} at J = 0, got ${muOverU}`);
  }
  const z = ws.mott.geometry.coordination;
  let evaluations = 0;
  let lastMott = true;
  let allConverged = true;
  const f = (hopping: number): number => {
    evaluations++;
    if (temperatureOverU > 0) {
      const r = thermalResponseEigenvalue(ws, hopping, muOverU, temperatureOverU);
      allConverged = allConverged && r.converged;
      return hopping * r.eigenvalue - 1;
    }
    const r = mottResponse(ws.mott, hopping, 1, muOverU);
    lastMott = r.mottGround;
    allConverged = allConverged && r.converged;
    return r.mottGround ? hopping * r.eigenvalue - 1 : 1;
  };
  const start = guess > 0 ? guess : Math.max(1e-6, singleSiteZJ(n, Math.min(Math.max(muOverU, n - 1 + 1e-9), n - 1e-9)) / z);
  let lo = 0;
  let flo = -1;
  let hi = start;
  let fhi = f(hi);
  for (let k = 0; k < 60 && fhi < 0; k++) {
    lo = hi;
    flo = fhi;
    hi *= 1.25;
    fhi = f(hi);
  }
  if (lo === 0) {
    // The guess was already outside: step down to a point inside.
    for (let k = 0; k < 60; k++) {
      const t = hi / 1.25;
      const ft = f(t);
      if (ft < 0) {
        lo = t;
        flo = ft;
        break;
      }
      hi = t;
      fhi = ft;
    }
  }
  const root = brentRoot(f, lo, hi, flo, fhi, 1e-13 * hi, 0, 200);
  // Which side did it end on: level crossing if just above the root the Mott sector is gone.
  let kind: CriticalHopping['kind'] = 'instability';
  if (temperatureOverU === 0) {
    f(root.root * (1 + 1e-8));
    if (!lastMott) kind = 'levelCrossing';
  }
  return {
    hoppingOverU: root.root,
    zJOverU: z * root.root,
    kind,
    converged: root.converged && allConverged,
    evaluations,
  };
}

export interface LobeTip {
  muOverU: number;
  hoppingOverU: number;
  zJOverU: number;
  /** (U/J)_c at the tip */
  uOverJ: number;
  converged: boolean;
  evaluations: number;
}

/** The tip of the Mott lobe of filling ws.filling at T = 0 (largest J_c over mu). */
export function clusterLobeTip(ws: LobeWorkspace, muTolerance = 1e-6): LobeTip {
  const n = ws.filling;
  let evaluations = 0;
  let converged = true;
  let guess = NaN;
  const jc = (mu: number): number => {
    const r = clusterCriticalHopping(ws, mu, 0, guess);
    evaluations += r.evaluations;
    converged = converged && r.converged;
    guess = r.hoppingOverU;
    return r.hoppingOverU;
  };
  const { x: mu, value: j } = goldenSectionMaximum(jc, n - 1 + 1e-3, n - 1e-3, { width: muTolerance });
  return {
    muOverU: mu,
    hoppingOverU: j,
    zJOverU: ws.mott.geometry.coordination * j,
    uOverJ: 1 / j,
    converged,
    evaluations,
  };
}

export interface ClusterLobeBoundary {
  filling: number;
  /** mu/U of each point */
  mu: Float64Array;
  /** z J_c / U of each point */
  zJ: Float64Array;
  /** 1 where the edge is a level crossing of the cluster, 0 for the linear instability */
  levelCrossing: Uint8Array;
  tipZJ: number;
  tipMu: number;
  converged: boolean;
}

/**
 * The lobe boundary zJ_c/U against mu/U at T = 0 for filling n, on `points` cosine-spaced
 * values of mu in (n - 1, n) (dense toward the ends, where the curve is steep), plus the tip.
 */
export function clusterLobeBoundary(shape: readonly number[], nmax: number, filling: number, points: number): ClusterLobeBoundary {
  if (!Number.isInteger(points) || points < 2) throw new ParameterError('points', `expected an integer >= 2, got ${points}`);
  const ws = createLobeWorkspace(shape, nmax, filling);
  const mu = new Float64Array(points);
  const zJ = new Float64Array(points);
  const level = new Uint8Array(points);
  let converged = true;
  let guess = NaN;
  for (let k = 0; k < points; k++) {
    const t = 0.5 - 0.5 * Math.cos((Math.PI * (k + 0.5)) / points);
    mu[k] = filling - 1 + t;
    const r = clusterCriticalHopping(ws, mu[k], 0, guess);
    zJ[k] = r.zJOverU;
    level[k] = r.kind === 'levelCrossing' ? 1 : 0;
    converged = converged && r.converged;
    guess = r.hoppingOverU;
  }
  const tip = clusterLobeTip(ws);
  return { filling, mu, zJ, levelCrossing: level, tipZJ: tip.zJOverU, tipMu: tip.muOverU, converged: converged && tip.converged };
}
