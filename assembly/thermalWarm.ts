// Thermal sweep update of one site from its stored spectrum: the operations of
// src/solver/site/thermalWarmStart.ts (each level predicted to first order in the change of
// psi by Hellmann-Feynman, d lambda_j/d psi = -2 <j|b|j>, refined by Laguerre steps on the
// characteristic polynomial, <j|b|j> again by Hellmann-Feynman), with the levels that are
// refined processed two at a time in f64x2 lanes: each lane performs the reference's
// operations for its level, so the doubles are the same.

import { fdExp } from './fdlibm';
import { COUPL, DIAG, EIG, OFFSQ, POP, T_LEVELS } from './scratch';
import { solveSiteThermal, thermalPhiByEigenvalues } from './thermalScalar';

let base: i32 = 0;
let stateCount: i32 = 0;

export function setWarmScratch(slot: i32, count: i32): void {
  base = slot;
  stateCount = count;
}

@inline function get(array: i32, k: i32): f64 {
  return load<f64>(base + array + (k << 3));
}
@inline function put(array: i32, k: i32, v: f64): void {
  store<f64>(base + array + (k << 3), v);
}
@inline function pair(a: f64, b: f64): v128 {
  return f64x2.replace_lane(f64x2.splat(a), 1, b);
}

/** One Laguerre step from each lane's lambda on DIAG / OFFSQ (laguerreStep.ts); 0 where p = 0. */
function laguerreSteps(lambda: v128): v128 {
  const n = stateCount;
  const one = f64x2.splat(1.0);
  const zero = f64x2.splat(0.0);
  let pPrev = one;
  let dPrev = zero;
  let ddPrev = zero;
  let p = f64x2.sub(f64x2.splat(get(DIAG, 0)), lambda);
  let d = f64x2.splat(-1.0);
  let dd = zero;
  for (let k = 1; k < n; k++) {
    const shifted = f64x2.sub(f64x2.splat(get(DIAG, k)), lambda);
    const e2 = f64x2.splat(get(OFFSQ, k - 1));
    const pNew = f64x2.sub(f64x2.mul(shifted, p), f64x2.mul(e2, pPrev));
    const dNew = f64x2.sub(f64x2.sub(f64x2.mul(shifted, d), p), f64x2.mul(e2, dPrev));
    const ddNew = f64x2.sub(f64x2.sub(f64x2.mul(shifted, dd), f64x2.add(d, d)), f64x2.mul(e2, ddPrev));
    pPrev = p;
    dPrev = d;
    ddPrev = dd;
    p = pNew;
    d = dNew;
    dd = ddNew;
  }
  const invP = f64x2.div(one, p);
  const g = f64x2.mul(d, invP);
  const h = f64x2.sub(f64x2.mul(g, g), f64x2.mul(dd, invP));
  const disc = f64x2.mul(f64x2.splat(<f64>(n - 1)), f64x2.sub(f64x2.mul(f64x2.splat(<f64>n), h), f64x2.mul(g, g)));
  const root = f64x2.sqrt(f64x2.pmax(zero, disc)); // disc > 0 ? disc : 0
  const den = v128.bitselect(f64x2.sub(g, root), f64x2.add(g, root), f64x2.lt(g, zero));
  const step = f64x2.div(f64x2.splat(-<f64>n), den);
  return v128.bitselect(zero, step, f64x2.eq(p, zero));
}

/** <j|b|j> of each lane's eigenvalue (couplingAt in thermalCouplings.ts). */
function couplings(lambda: v128, psi: f64): v128 {
  const n = stateCount;
  const zero = f64x2.splat(0.0);
  let pPrev = f64x2.splat(1.0);
  let lPrev = zero;
  let sPrev = zero;
  let pc = f64x2.sub(f64x2.splat(get(DIAG, 0)), lambda);
  let lc = f64x2.splat(-1.0);
  let sc = zero;
  const twoPsi = 2.0 * psi;
  for (let k = 1; k < n; k++) {
    const shifted = f64x2.sub(f64x2.splat(get(DIAG, k)), lambda);
    const e2 = f64x2.splat(get(OFFSQ, k - 1));
    const pNew = f64x2.sub(f64x2.mul(shifted, pc), f64x2.mul(e2, pPrev));
    const lNew = f64x2.sub(f64x2.sub(f64x2.mul(shifted, lc), pc), f64x2.mul(e2, lPrev));
    const sNew = f64x2.sub(f64x2.sub(f64x2.mul(shifted, sc), f64x2.mul(f64x2.splat(twoPsi * <f64>k), pPrev)), f64x2.mul(e2, sPrev));
    pPrev = pc;
    lPrev = lc;
    sPrev = sc;
    pc = pNew;
    lc = lNew;
    sc = sNew;
  }
  return f64x2.div(f64x2.mul(f64x2.splat(0.5), sc), lc);
}

let warmPhi: f64 = 0.0;

/**
 * thermalFromSpectrum: false when the stored spectrum cannot be used (nothing stored);
 * otherwise phi in warmPhi and the store updated.
 */
function thermalFromSpectrum(interactionU: f64, muLocal: f64, psi: f64, dPsi: f64, temperature: f64, spectrumPtr: i32, couplingsPtr: i32): bool {
  const n = stateCount;
  const s0 = load<f64>(spectrumPtr);
  if (!(s0 == s0) || n > 17) return false;
  const psiSq = psi * psi;
  let a: f64 = 0.0;
  let scale = Math.abs(interactionU) + Math.abs(muLocal) + Math.abs(psi);
  for (let k = 0; k < n; k++) {
    put(DIAG, k, a);
    put(OFFSQ, k, psiSq * <f64>(k + 1));
    a += interactionU * <f64>k - muLocal;
    if (Math.abs(get(DIAG, k)) > scale) scale = Math.abs(get(DIAG, k));
  }
  for (let j = 0; j < n; j++) put(POP, j, load<f64>(spectrumPtr + (j << 3)) - 2.0 * load<f64>(couplingsPtr + (j << 3)) * dPsi);
  const beta = 1.0 / temperature;
  const small = f64x2.splat(1e-6 * scale);
  const e0Predicted = get(POP, 0);
  // The levels to refine (the others keep their prediction).
  const levels = base + T_LEVELS;
  let count = 0;
  for (let j = 0; j < n; j++) {
    const predicted = get(POP, j);
    if ((predicted - e0Predicted) * beta > 45) {
      put(EIG, j, predicted);
      put(COUPL, j, load<f64>(couplingsPtr + (j << 3)));
    } else {
      store<i32>(levels + (count << 2), j);
      count++;
    }
  }
  // Laguerre refinement and <j|b|j>, two levels at a time (an odd last level in both lanes).
  for (let m = 0; m < count; m += 2) {
    const jA = load<i32>(levels + (m << 2));
    const jB = m + 1 < count ? load<i32>(levels + ((m + 1) << 2)) : jA;
    let lambda = pair(get(POP, jA), get(POP, jB));
    let active = i64x2.splat(-1); // lanes still iterating (a NaN prediction never converges)
    let converged = i64x2.splat(0);
    for (let iter = 0; iter < 8; iter++) {
      const step = laguerreSteps(lambda);
      lambda = v128.bitselect(f64x2.add(lambda, step), lambda, active);
      const done = v128.and(active, v128.or(f64x2.eq(step, f64x2.splat(0.0)), f64x2.le(f64x2.abs(step), small)));
      converged = v128.or(converged, done);
      active = v128.andnot(active, done);
      if (!v128.any_true(active)) break;
    }
    if (!i64x2.all_true(converged)) return false;
    const bj = couplings(lambda, psi);
    put(EIG, jA, f64x2.extract_lane(lambda, 0));
    put(COUPL, jA, f64x2.extract_lane(bj, 0));
    put(EIG, jB, f64x2.extract_lane(lambda, 1));
    put(COUPL, jB, f64x2.extract_lane(bj, 1));
  }
  // The reference's checks and Boltzmann sums, level by level in order.
  let partition: f64 = 0.0;
  let phi: f64 = 0.0;
  let e0: f64 = 0.0;
  for (let m = 0; m < count; m++) {
    const j = load<i32>(levels + (m << 2));
    const predicted = get(POP, j);
    const lambda = get(EIG, j);
    const below: f64 = j > 0 ? predicted - get(POP, j - 1) : Infinity;
    const above: f64 = j < n - 1 ? get(POP, j + 1) - predicted : Infinity;
    const nearest = Math.min(below, above);
    const reach = 0.3 * nearest;
    if (!(Math.abs(lambda - predicted) < reach) || !(nearest > 1e-7 * scale)) return false;
    if (j == 0) e0 = lambda;
    const w = fdExp(-(lambda - e0) * beta);
    partition += w;
    phi += w * get(COUPL, j);
  }
  for (let j = 0; j < n; j++) {
    store<f64>(spectrumPtr + (j << 3), get(EIG, j));
    store<f64>(couplingsPtr + (j << 3), get(COUPL, j));
  }
  warmPhi = phi / partition;
  return true;
}

/** thermalSweepUpdate (thermalWarmStart.ts): phi of the site; the store is updated. */
export function thermalSweepUpdate(interactionU: f64, muLocal: f64, psi: f64, dPsi: f64, temperature: f64, spectrumPtr: i32, couplingsPtr: i32): f64 {
  if (thermalFromSpectrum(interactionU, muLocal, psi, dPsi, temperature, spectrumPtr, couplingsPtr)) return warmPhi;
  const n = stateCount;
  let phi: f64 = NaN;
  if (psi != 0 && n <= 17) phi = thermalPhiByEigenvalues(interactionU, muLocal, psi, temperature);
  if (!(phi == phi)) {
    phi = solveSiteThermal(interactionU, muLocal, psi, temperature, false);
    store<f64>(spectrumPtr, NaN);
    return phi;
  }
  for (let j = 0; j < n; j++) {
    store<f64>(spectrumPtr + (j << 3), get(EIG, j));
    store<f64>(couplingsPtr + (j << 3), get(COUPL, j));
  }
  return phi;
}
