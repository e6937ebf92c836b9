// Superfluid fraction per periodic axis from the response of the grand potential (fixed mu)
// to a phase twist q per bond along that axis (twisted boundary conditions; Fisher, Barber &
// Jasnow, PRA 8, 1111 (1973) for the helicity modulus, the criterion of the Bose glass in
// Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989)):
//
//   f_s = (d^2 Omega / dq^2 at q = 0) / (2 sum_{bonds along d} J_b (n_i + n_j)/2),
//
// normalised so that the non-interacting condensate (phi_i = sqrt(n)) gives 1, and a clean
// uniform lattice in mean field gives |phi|^2 / n exactly (the twist turns J into J cos q on
// those bonds, Hellmann-Feynman). The curvature is a central difference at +-q and 0 for two
// twist sizes, q and q/2, Richardson-extrapolated (the q^2 error term cancels); the reported
// error is |D(q/2) - D(q)| / 3, the estimated error of the finer difference, an upper bound
// of the extrapolated one when the series in q^2 is regular.
//
// Local map (where the superflow runs): by Hellmann-Feynman at a converged twisted solution,
// dOmega/dq = sum_b I_b with the bond current I_b = 2 J_b Im(e^{i q} phi_i^* phi_j), the
// expectation of the current operator on bond b in the product state. Its central
// difference K_b = (I_b(+q) - I_b(-q)) / 2q, Richardson-extrapolated like the energy, is the
// bond's share of the curvature (sum_b K_b = d^2 Omega/dq^2 to the solver tolerance), and
// f_b = K_b / <J (n_i + n_j)> its local superfluid fraction, stored at the bond's lower site,
// with <.> the mean over the bonds along the axis, so f_s is the plain mean of f_b. (Dividing
// by the bond's own J_b (n_i + n_j) would blow up on nearly empty bonds next to a puddle.)
// In a clean lattice every f_b = |phi|^2/n; puddles that carry no superflow show f_b ~ 0
// even where phi is large.
//
// An open axis has no boundary condition to twist: a uniform phase per bond is removed by
// the gauge transformation phi_x -> e^{-i q x} phi_x, so Omega does not depend on it and the
// curvature says nothing. Such axes are reported as null with that reason.

import type { LatticeModel } from '../../lattice/latticeModel.js';
import { solveTwisted, type TwistedSolution } from './twistedSolve.js';

export interface AxisStiffness {
  /** physical axis */
  axis: number;
  /** superfluid fraction, or null when the axis cannot carry a twist */
  value: number | null;
  /** numerical error estimate of value (two twist sizes) */
  error: number | null;
  /** why value is null (open axis, one site) */
  reason: string | null;
  /** d^2 Omega / dq^2 at q = 0, energy unit of the model (per radian^2 per bond twist) */
  curvature: number | null;
  /** twist per bond of the coarser difference, radians */
  twistPerBond: number | null;
  /** all twisted solves converged and the two twist sizes agree within the tolerance */
  converged: boolean;
  /** local superfluid fraction f_b of the bond from each site along this axis (its curvature share over the mean J (n_i + n_j) of the axis' bonds, so value = mean of f_b; NaN where there is no bond), null on an axis without a twist */
  localFraction: Float64Array | null;
}

/** Bond currents 2 J Im(e^{i t} phi_i^* phi_j) of the bonds along axis d of a twisted solution, at the bond's lower site. */
function bondCurrents(s: TwistedSolution, d: number, t: number): Float64Array {
  const b = s.bonds;
  const out = new Float64Array(b.siteCount);
  const c = Math.cos(t);
  const sn = Math.sin(t);
  for (let k = 0; k < b.bondFrom.length; k++) {
    if (b.bondAxis[k] !== d) continue;
    const i = b.bondFrom[k];
    const j = b.bondTo[k];
    // z = phi_i^* phi_j
    const zr = s.phiRe[i] * s.phiRe[j] + s.phiIm[i] * s.phiIm[j];
    const zi = s.phiRe[i] * s.phiIm[j] - s.phiIm[i] * s.phiRe[j];
    out[i] = 2 * b.bondHopping[k] * (sn * zr + c * zi);
  }
  return out;
}

export interface StiffnessOptions {
  mu: number;
  temperature: number;
  /** starting field (the main solution) */
  initialPhi: Float64Array;
  tolerance: number;
  maxSweeps: number;
  /** relative agreement of the two twist sizes above which the curvature counts as not converged */
  agreement?: number;
}

export interface StiffnessResult {
  axes: AxisStiffness[];
  /** the untwisted solution (Omega(0), density) */
  untwisted: TwistedSolution;
  /** twisted solves done, and their sweeps in total */
  solves: number;
  sweeps: number;
}

/** Twist per bond of the coarser difference: small, and a total twist L q of at most pi/4 so the untwisted branch stays the lowest. */
export function stiffnessTwist(length: number): number {
  return Math.min(0.02, Math.PI / (4 * length));
}

export function superfluidStiffness(model: LatticeModel, options: StiffnessOptions): StiffnessResult {
  const g = model.geometry;
  const zero = g.shape.map(() => 0);
  const common = { mu: options.mu, temperature: options.temperature, tolerance: options.tolerance, maxSweeps: options.maxSweeps };
  const untwisted = solveTwisted(model, { ...common, twistPerBond: zero, initialRe: options.initialPhi });
  let solves = 1;
  let sweeps = untwisted.sweeps;
  const agreement = options.agreement ?? 1e-3;
  const axes: AxisStiffness[] = [];
  for (let d = 0; d < g.dims; d++) {
    const L = g.shape[d];
    if (!g.periodic[d] || L < 2) {
      axes.push({
        axis: d,
        value: null,
        error: null,
        reason: L < 2 ? 'axis has one site' : 'open axis: a uniform twist is a pure gauge there, Omega does not depend on it',
        curvature: null,
        twistPerBond: null,
        converged: true,
        localFraction: null,
      });
      continue;
    }
    const q = stiffnessTwist(L);
    let allConverged = untwisted.converged;
    // +t starts from the field `re, im`; -t starts from the complex conjugate of the +t
    // solution (the exact -t solution when the +t one is exact: time reversal), and is
    // still solved to the tolerance like the others.
    const solveAt = (t: number, re: Float64Array, im: Float64Array): TwistedSolution => {
      const twist = zero.slice();
      twist[d] = t;
      const s = solveTwisted(model, { ...common, twistPerBond: twist, initialRe: re, initialIm: im });
      solves++;
      sweeps += s.sweeps;
      if (!s.converged) allConverged = false;
      return s;
    };
    const conjugate = (a: Float64Array): Float64Array => a.map((v) => -v);
    const o0 = untwisted.grandPotential;
    const h = q / 2;
    const plusFine = solveAt(h, untwisted.phiRe, untwisted.phiIm);
    const minusFine = solveAt(-h, plusFine.phiRe, conjugate(plusFine.phiIm));
    // the coarse twist starts from the linear extrapolation 2 phi(q/2) - phi(0)
    const startRe = plusFine.phiRe.map((v, i) => 2 * v - untwisted.phiRe[i]);
    const startIm = plusFine.phiIm.map((v, i) => 2 * v - untwisted.phiIm[i]);
    const plusCoarse = solveAt(q, startRe, startIm);
    const minusCoarse = solveAt(-q, plusCoarse.phiRe, conjugate(plusCoarse.phiIm));
    const coarse = (plusCoarse.grandPotential - 2 * o0 + minusCoarse.grandPotential) / (q * q);
    const fine = (plusFine.grandPotential - 2 * o0 + minusFine.grandPotential) / (h * h);
    const curvature = (4 * fine - coarse) / 3;
    const curvatureError = Math.abs(fine - coarse) / 3;
    // reference: 2 sum_b J_b (n_i + n_j)/2 over the bonds along d
    let reference = 0;
    const b = untwisted.bonds;
    const localFraction = new Float64Array(b.siteCount).fill(NaN);
    let bondsAlong = 0;
    const iPlusFine = bondCurrents(plusFine, d, h);
    const iMinusFine = bondCurrents(minusFine, d, -h);
    const iPlusCoarse = bondCurrents(plusCoarse, d, q);
    const iMinusCoarse = bondCurrents(minusCoarse, d, -q);
    for (let k = 0; k < b.bondFrom.length; k++) {
      if (b.bondAxis[k] !== d) continue;
      const i = b.bondFrom[k];
      reference += b.bondHopping[k] * (untwisted.density[i] + untwisted.density[b.bondTo[k]]);
      bondsAlong++;
      const kFine = (iPlusFine[i] - iMinusFine[i]) / (2 * h);
      const kCoarse = (iPlusCoarse[i] - iMinusCoarse[i]) / (2 * q);
      localFraction[i] = (4 * kFine - kCoarse) / 3; // the bond's curvature share, normalised below
    }
    const meanWeight = reference / Math.max(1, bondsAlong);
    for (let i = 0; i < localFraction.length; i++) if (!Number.isNaN(localFraction[i])) localFraction[i] = meanWeight > 0 ? localFraction[i] / meanWeight : 0;
    if (reference === 0) {
      // no hopping or no atoms on this axis: Omega does not depend on q at all, the stiffness is zero
      axes.push({ axis: d, value: 0, error: 0, reason: null, curvature: 0, twistPerBond: q, converged: allConverged, localFraction });
      continue;
    }
    const value = curvature / reference;
    const error = curvatureError / reference;
    const converged = allConverged && error <= agreement * Math.max(Math.abs(value), 1e-2);
    axes.push({ axis: d, value, error, reason: null, curvature, twistPerBond: q, converged, localFraction });
  }
  return { axes, untwisted, solves, sweeps };
}
