// Static Gutzwiller solution with complex order parameters and a Peierls phase per bond
// (twistedBonds.ts), at fixed chemical potential, T = 0 or T > 0.
//
// The site problem stays the real one of src/solver/site: with psi_i = |psi_i| e^{i theta_i}
// the site Hamiltonian -psi_i^* b - psi_i b^+ + ... becomes the real one with |psi_i| in the
// basis |n> -> e^{i n theta_i} |n> (a gauge rotation of the site), so phi_i = <b_i> is the
// real solution times e^{i theta_i}. Red-black Gauss-Seidel sweeps in plain JavaScript on one
// thread (the twisted solves are few and warm-started; the parallel kernels of the main
// solve are real-valued and not reused here).
//
// The grand potential at fixed mu is evaluated on the Gutzwiller product state:
//   Omega = -sum_bonds 2 J_b Re(e^{i q_b} phi_i^* phi_j)
//           + sum_i [U_i/2 <n(n-1)>_i + (eps_i - mu) <n>_i] - T sum_i S_i,
// the expectation of H - mu N (minus T S) in that state (standard mean-field decoupling).

import type { LatticeModel } from '../../lattice/latticeModel.js';
import { createSiteObservables, createSiteWorkspace, solveSite, solveSiteGround, solveSiteThermal } from '../site/index.js';
import { slowModeFactor } from '../relaxation.js';
import { twistedBonds, type TwistedBonds } from './twistedBonds.js';

export interface TwistedSolveOptions {
  mu: number;
  /** kT in the model's energy unit; <= 0 for the ground state */
  temperature: number;
  /** Peierls phase per bond, radians, one per physical axis */
  twistPerBond: readonly number[];
  /** stop when the last max |delta phi| and its geometric-tail estimate are below this */
  tolerance: number;
  maxSweeps: number;
  /** starting order parameter (real part; imaginary part optional, zero if absent) */
  initialRe: Float64Array;
  initialIm?: Float64Array;
  /**
   * extrapolate the slowest mode when three contraction-rate estimates agree (default on):
   * the Aitken step of relaxation.ts, phi <- phi + delta r/(1 - r), on the complex field.
   * The twist relaxes through long-wavelength phase modes that Gauss-Seidel contracts slowly.
   */
  accelerate?: boolean;
}

export interface TwistedSolution {
  phiRe: Float64Array;
  phiIm: Float64Array;
  density: Float64Array;
  /** Omega at fixed mu of the product state (header), energy unit of the model */
  grandPotential: number;
  /** hopping part of Omega, -sum_bonds 2 J Re(e^{iq} phi_i^* phi_j) */
  hoppingEnergy: number;
  atoms: number;
  /** sum_i |phi_i|^2 */
  condensedAtoms: number;
  sweeps: number;
  converged: boolean;
  extrapolations: number;
  /** last max |delta phi| */
  lastChange: number;
  bonds: TwistedBonds;
}

function interactionAt(model: LatticeModel, i: number): number {
  const u = model.interactionU;
  return typeof u === 'number' ? u : u[i];
}

export function solveTwisted(model: LatticeModel, options: TwistedSolveOptions): TwistedSolution {
  const N = model.geometry.siteCount;
  if (options.initialRe.length !== N) throw new RangeError(`initialRe: expected ${N} values, got ${options.initialRe.length}`);
  const bonds = twistedBonds(model, options.twistPerBond);
  const { neighbour, coefRe, coefIm, slots, colour } = bonds;
  const phiRe = Float64Array.from(options.initialRe);
  const phiIm = options.initialIm ? Float64Array.from(options.initialIm) : new Float64Array(N);
  const ws = createSiteWorkspace(model.nmax);
  const thermal = options.temperature > 0;
  const mu = options.mu;
  const eps = model.eps;

  /** psi_i = sum_j J_ij e^{i q_ij} phi_j into field[0] (real) and field[1] (imaginary) */
  const field = new Float64Array(2);
  const fieldAt = (i: number): void => {
    let pr = 0;
    let pi = 0;
    const base = i * slots;
    for (let s = 0; s < slots; s++) {
      const j = neighbour[base + s];
      if (j < 0) continue;
      const cr = coefRe[base + s];
      const ci = coefIm[base + s];
      pr += cr * phiRe[j] - ci * phiIm[j];
      pi += ci * phiRe[j] + cr * phiIm[j];
    }
    field[0] = pr;
    field[1] = pi;
  };

  const colourSites = [0, 1].map((c) => {
    const list: number[] = [];
    for (let i = 0; i < N; i++) if (colour[i] === c) list.push(i);
    return Int32Array.from(list);
  });

  const accelerate = options.accelerate ?? true;
  const deltaRe = new Float64Array(N);
  const deltaIm = new Float64Array(N);
  const rates: number[] = [];
  let sinceExtrapolation = 0;
  let extrapolations = 0;
  let maxFactor = 5000;
  let lastChangeBeforeExtrapolation = NaN;
  let sweeps = 0;
  let lastChange = Infinity;
  let previousChange = Infinity;
  let converged = false;
  while (sweeps < options.maxSweeps) {
    let change = 0;
    for (const sites of colourSites) {
      for (let k = 0; k < sites.length; k++) {
        const i = sites[k];
        fieldAt(i);
        const pr = field[0];
        const pi = field[1];
        const a = Math.hypot(pr, pi);
        let nr = 0;
        let ni = 0;
        if (a > 0) {
          const u = interactionAt(model, i);
          const mag = thermal ? solveSiteThermal(ws, u, mu - eps[i], a, options.temperature, null) : solveSiteGround(ws, u, mu - eps[i], a, NaN);
          nr = (mag * pr) / a;
          ni = (mag * pi) / a;
        }
        deltaRe[i] = nr - phiRe[i];
        deltaIm[i] = ni - phiIm[i];
        const dc = Math.hypot(deltaRe[i], deltaIm[i]);
        if (dc > change) change = dc;
        phiRe[i] = nr;
        phiIm[i] = ni;
      }
    }
    sweeps++;
    sinceExtrapolation++;
    previousChange = lastChange;
    lastChange = change;
    if (!(change === change)) break; // NaN: not converged
    // geometric-tail estimate of the remaining error, change * r / (1 - r) (as relaxation.ts);
    // no rate across an extrapolation step
    const r = sinceExtrapolation >= 2 && previousChange > 0 && Number.isFinite(previousChange) ? change / previousChange : 1;
    if (sinceExtrapolation >= 2) rates.push(r);
    const tail = r < 1 ? (change * r) / (1 - r) : Infinity;
    // a change far below the tolerance stops whatever r says (rounding noise can make r >= 1)
    if (change < 1e-3 * options.tolerance || (change < options.tolerance && tail < options.tolerance)) {
      converged = true;
      break;
    }
    if (sinceExtrapolation === 1 && extrapolations > 0 && change > 10 * lastChangeBeforeExtrapolation) {
      maxFactor = Math.max(2, maxFactor / 8); // the last step overshot: be more careful
    }
    const factor = accelerate ? slowModeFactor(rates, sinceExtrapolation, maxFactor) : 0;
    if (factor > 0) {
      for (let i = 0; i < N; i++) {
        const cr = phiRe[i];
        const ci = phiIm[i];
        const xr = cr + factor * deltaRe[i];
        const xi = ci + factor * deltaIm[i];
        // keep |phi| above a small fraction of the current one (no region set to zero)
        if (Math.hypot(xr, xi) >= 0.01 * Math.hypot(cr, ci)) {
          phiRe[i] = xr;
          phiIm[i] = xi;
        } else {
          phiRe[i] = 0.01 * cr;
          phiIm[i] = 0.01 * ci;
        }
      }
      extrapolations++;
      sinceExtrapolation = 0;
      rates.length = 0;
      lastChangeBeforeExtrapolation = change;
    }
  }

  // measurement on the final field
  const out = createSiteObservables();
  const density = new Float64Array(N);
  let local = 0;
  let atoms = 0;
  let condensed = 0;
  for (let i = 0; i < N; i++) {
    fieldAt(i);
    const u = interactionAt(model, i);
    solveSite(ws, u, mu - eps[i], Math.hypot(field[0], field[1]), options.temperature, out);
    density[i] = out.density;
    atoms += out.density;
    condensed += phiRe[i] * phiRe[i] + phiIm[i] * phiIm[i];
    local += 0.5 * u * (out.densitySq - out.density) + (eps[i] - mu) * out.density;
    if (thermal) local -= options.temperature * out.entropy;
  }
  let hopping = 0;
  for (let b = 0; b < bonds.bondFrom.length; b++) {
    const i = bonds.bondFrom[b];
    const j = bonds.bondTo[b];
    const c = bonds.bondCos[b];
    const s = bonds.bondSin[b];
    const wr = c * phiRe[j] - s * phiIm[j];
    const wi = s * phiRe[j] + c * phiIm[j];
    hopping -= 2 * bonds.bondHopping[b] * (phiRe[i] * wr + phiIm[i] * wi);
  }
  return {
    phiRe,
    phiIm,
    density,
    grandPotential: hopping + local,
    hoppingEnergy: hopping,
    atoms,
    condensedAtoms: condensed,
    sweeps,
    converged,
    extrapolations,
    lastChange,
    bonds,
  };
}
