// Ground states of two sites of one colour at once, in the two f64x2 lanes of WebAssembly
// SIMD: the warm path of groundScalar.ts (Laguerre's method on the characteristic
// polynomial from the Hellmann-Feynman estimate, eigenvector from the adjugate; Usmani,
// Linear Algebra Appl. 212/213, 413 (1994)) with every data-dependent branch replaced by a
// lane mask, so that each lane performs exactly the operations of the scalar code and
// gives the same doubles. A lane whose estimate lands on an excited state (a vector with a
// sign change) is redone by the scalar code from its Weyl bound, as in the reference.

import { groundEnergy, solveGroundScalar } from './groundScalar';
import { PAIR_SET, P_AMP, P_CURV, P_DIAG, P_INDEX, P_LEAD, P_OFFSQ, P_RADIUS, P_SLOPE, P_SQRTUP, P_TRAIL } from './scratch';
import { epsPtr, f64At, interactionAt, lowerPtr, phiPtr, psiPrevPtr } from './lattice';

let base: i32 = 0;
let stateCount: i32 = 0;

export let pairPhiA: f64 = 0.0;
export let pairPhiB: f64 = 0.0;
export let pairEnergyA: f64 = 0.0;
export let pairEnergyB: f64 = 0.0;

export function setPairScratch(slot: i32, count: i32): void {
  base = slot;
  stateCount = count;
  // The constant tables in both pair workspaces (the quad kernel uses the second one).
  for (let set = slot; set <= slot + PAIR_SET; set += PAIR_SET) {
    for (let k = 0; k < count; k++) {
      v128.store(set + (k << 4), f64x2.splat(<f64>k), P_INDEX);
      v128.store(set + (k << 4), f64x2.splat(Math.sqrt(<f64>(k + 1))), P_SQRTUP);
    }
    // Gershgorin radius per psi, summed as in the reference: sqrt(n) + sqrt(n + 1) at the
    // edges without the missing term (0 + x = x).
    for (let n = 0; n < count; n++) {
      const left: f64 = n > 0 ? Math.sqrt(<f64>n) : 0.0;
      const right: f64 = n < count - 1 ? Math.sqrt(<f64>(n + 1)) : 0.0;
      v128.store(set + (n << 4), f64x2.splat(left + right), P_RADIUS);
    }
    v128.store(set + (count << 4), f64x2.splat(<f64>count), P_INDEX);
  }
}

@inline export function pair(a: f64, b: f64): v128 {
  return f64x2.replace_lane(f64x2.splat(a), 1, b);
}
@inline export function select(ifSet: v128, otherwise: v128, mask: v128): v128 {
  return v128.bitselect(ifSet, otherwise, mask);
}

/** solveGroundPair results */
export const PAIR_NOT_APPLICABLE = 0;
export const PAIR_SOLVED = 1;
/** solved, but a lane needed the scalar fall-back (its amplitudes are not in P_AMP) */
export const PAIR_FALLBACK = 2;

/**
 * Ground states of sites iA and iB (mean fields psiA, psiB), started like the sweeps of
 * the reference: from the stored lower energies (Hellmann-Feynman estimate, Weyl bound as
 * the fall-back) or, when neither site has one yet or forceCold (the measuring pass), cold
 * from Gershgorin's bound. phi and
 * energy per lane in pairPhi* / pairEnergy*, the normalised amplitudes in P_AMP. Returns
 * PAIR_NOT_APPLICABLE (nothing done) when only one site has a warm start or a psi is not
 * > 0: the caller then uses the scalar code for both.
 */
export function solveGroundPair(iA: i32, iB: i32, psiA: f64, psiB: f64, mu: f64, coupling: f64, forceCold: bool): i32 {
  const i = iA;
  const prevA = forceCold ? NaN : f64At(lowerPtr, iA);
  const prevB = forceCold ? NaN : f64At(lowerPtr, iB);
  if (!(psiA > 0) || !(psiB > 0)) return PAIR_NOT_APPLICABLE;
  const cold = !(prevA == prevA);
  if (cold == (prevB == prevB)) return PAIR_NOT_APPLICABLE; // one warm, one cold
  const b = base;
  const states = stateCount;
  const last = states - 1;
  const one = f64x2.splat(1.0);
  const zero = f64x2.splat(0.0);
  const u = pair(interactionAt(i), interactionAt(iB));
  const muLocal = f64x2.sub(f64x2.splat(mu), pair(f64At(epsPtr, i), f64At(epsPtr, iB)));
  const psi = pair(psiA, psiB);
  const prev = pair(prevA, prevB);
  const dPsi = f64x2.sub(psi, pair(f64At(psiPrevPtr, i), f64At(psiPrevPtr, iB)));
  const phiOld = pair(f64At(phiPtr, i), f64At(phiPtr, iB));
  // bound = prev - |dPsi| coupling - 1e-12 (|prev| + u); estimate = prev - 2 phi dPsi
  const bound = f64x2.sub(
    f64x2.sub(prev, f64x2.mul(f64x2.abs(dPsi), f64x2.splat(coupling))),
    f64x2.mul(f64x2.splat(1e-12), f64x2.add(f64x2.abs(prev), u)),
  );
  const estimate = f64x2.sub(prev, f64x2.mul(f64x2.mul(f64x2.splat(2.0), phiOld), dPsi));
  const psiSq = f64x2.mul(psi, psi);

  let lambda = estimate;
  let minDiag = zero;
  let pPrev = one;
  let dPrev = zero;
  let ddPrev = zero;
  let p = zero;
  let d = f64x2.splat(-1.0);
  let dd = zero;
  v128.store(b, one, P_LEAD);
  if (!cold) {
    // First Laguerre evaluation at the estimate, with the diagonal a_k (by increments, as
    // in the reference), the squared off-diagonals psi^2 (k + 1) and the smallest diagonal
    // entry built on the way. Leading determinants and their two lambda-derivatives are kept.
    v128.store(b, zero, P_DIAG);
    let a = f64x2.sub(f64x2.mul(u, zero), muLocal);
    p = f64x2.sub(zero, lambda);
    // pointer-stepped: q = b + 16 k
    for (let q = b + ((1) << 4), end = b + (states << 4); q < end; q += 16) {
      const index = v128.load(q, P_INDEX);
      v128.store(q, p, P_LEAD);
      v128.store(q, d, P_SLOPE);
      v128.store(q, dd, P_CURV);
      v128.store(q, a, P_DIAG);
      minDiag = f64x2.pmin(minDiag, a); // (a < minDiag) ? a : minDiag, as in the reference
      const e2 = f64x2.mul(psiSq, index);
      v128.store(q - 16, e2, P_OFFSQ);
      const shifted = f64x2.sub(a, lambda);
      a = f64x2.add(a, f64x2.sub(f64x2.mul(u, index), muLocal));
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
  } else {
    // Cold: the diagonal, then Gershgorin's lower bound min_n (a_n - psi (sqrt(n) + sqrt(n+1)))
    // with the reference's slack.
    let a = zero;
    let gersh = f64x2.splat(Infinity);
    for (let n = 0; n < states; n++) {
      const q = b + (n << 4);
      v128.store(q, a, P_DIAG);
      v128.store(q, f64x2.mul(psiSq, v128.load(q + 16, P_INDEX)), P_OFFSQ);
      minDiag = f64x2.pmin(minDiag, a);
      gersh = f64x2.pmin(gersh, f64x2.sub(a, f64x2.mul(psi, v128.load(q, P_RADIUS))));
      a = f64x2.add(a, f64x2.sub(f64x2.mul(u, v128.load(q, P_INDEX)), muLocal));
    }
    lambda = f64x2.sub(gersh, f64x2.mul(f64x2.splat(1e-12), f64x2.add(f64x2.abs(gersh), one)));
  }
  let leadAt = lambda;
  const degree = f64x2.splat(<f64>states);
  const degreeLess = f64x2.splat(<f64>last);
  const minusDegree = f64x2.splat(-<f64>states);
  const scale = f64x2.add(f64x2.add(f64x2.abs(minDiag), f64x2.abs(u)), psi);
  const small = f64x2.mul(f64x2.splat(1e-6), scale);
  let active = f64x2.eq(zero, zero); // all lanes
  // Laguerre steps; a lane stops (warm) at p = 0 or (cold, from a lower bound) at p <= 0, or
  // after a step below 1e-6 of the scale. Later evaluations overwrite the stored
  // determinants only in lanes still moving.
  for (let iter = 0; iter < 100; iter++) {
    if (iter > 0 || cold) {
      const full = i64x2.all_true(active);
      pPrev = one;
      dPrev = zero;
      ddPrev = zero;
      p = f64x2.sub(zero, lambda);
      d = f64x2.splat(-1.0);
      dd = zero;
      for (let k = 1; k < states; k++) {
        const q = b + (k << 4);
        if (full) {
          v128.store(q, p, P_LEAD);
          v128.store(q, d, P_SLOPE);
          v128.store(q, dd, P_CURV);
        } else {
          v128.store(q, select(p, v128.load(q, P_LEAD), active), P_LEAD);
          v128.store(q, select(d, v128.load(q, P_SLOPE), active), P_SLOPE);
          v128.store(q, select(dd, v128.load(q, P_CURV), active), P_CURV);
        }
        const shifted = f64x2.sub(v128.load(q, P_DIAG), lambda);
        const e2 = v128.load(q - 16, P_OFFSQ);
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
    }
    const stepping = cold ? v128.and(active, f64x2.gt(p, zero)) : v128.andnot(active, f64x2.eq(p, zero));
    const invP = f64x2.div(one, p);
    const g = f64x2.mul(d, invP);
    const h = f64x2.sub(f64x2.mul(g, g), f64x2.mul(dd, invP));
    const disc = f64x2.mul(degreeLess, f64x2.sub(f64x2.mul(degree, h), f64x2.mul(g, g)));
    const root = f64x2.sqrt(f64x2.pmax(zero, disc)); // disc > 0 ? disc : 0
    const den = select(f64x2.sub(g, root), f64x2.add(g, root), f64x2.lt(g, zero));
    const step = f64x2.div(minusDegree, den);
    lambda = select(f64x2.add(lambda, step), lambda, stepping);
    active = v128.and(stepping, f64x2.gt(f64x2.abs(step), small));
    if (!v128.any_true(active)) break;
    leadAt = select(lambda, leadAt, active);
  }

  const twist = pairTrailing(b, lambda, leadAt, scale);
  const norm = pairAdjugate(b, twist, psi);
  const negative = adjugateNegative;
  const phi = pairNormalise(b, norm);
  pairPhiA = f64x2.extract_lane(phi, 0);
  pairPhiB = f64x2.extract_lane(phi, 1);
  pairEnergyA = f64x2.extract_lane(lambda, 0);
  pairEnergyB = f64x2.extract_lane(lambda, 1);
  // A lane on an excited state: the scalar path from the Weyl bound, as in the reference.
  if (cold || !v128.any_true(negative)) return PAIR_SOLVED;
  if (i64x2.extract_lane(negative, 0) != 0) {
    pairPhiA = solveGroundScalar(f64x2.extract_lane(u, 0), f64x2.extract_lane(muLocal, 0), psiA, f64x2.extract_lane(bound, 0), NaN);
    pairEnergyA = groundEnergy;
  }
  if (i64x2.extract_lane(negative, 1) != 0) {
    pairPhiB = solveGroundScalar(f64x2.extract_lane(u, 1), f64x2.extract_lane(muLocal, 1), psiB, f64x2.extract_lane(bound, 1), NaN);
    pairEnergyB = groundEnergy;
  }
  return PAIR_FALLBACK;
}

/**
 * After the Laguerre search of the pair workspace at b: the leading determinants at lambda
 * (from leadAt by a second-order Taylor step where the lanes moved little, else by the
 * recurrence), the trailing determinants, and the twist index per lane (largest adjugate
 * diagonal entry), returned.
 */
@inline export function pairTrailing(b: i32, lambda: v128, leadAt: v128, scale: v128): v128 {
  const one = f64x2.splat(1.0);
  const zero = f64x2.splat(0.0);
  const states = stateCount;
  const last = states - 1;
  // Leading determinants carried to lambda by a second-order Taylor step (all lanes moved
  // little: done inside the trailing pass below) or recomputed by the recurrence.
  const moved = f64x2.sub(lambda, leadAt);
  const taylor = f64x2.le(f64x2.abs(moved), f64x2.mul(f64x2.splat(1e-5), scale));
  const half = f64x2.mul(f64x2.mul(f64x2.splat(0.5), moved), moved);
  const allTaylor = i64x2.all_true(taylor);
  if (!allTaylor) {
    let lPrev = one;
    let l = f64x2.sub(zero, lambda);
    for (let k = 1; k < states; k++) {
      const q = b + (k << 4);
      const carried = f64x2.add(v128.load(q, P_LEAD), f64x2.add(f64x2.mul(moved, v128.load(q, P_SLOPE)), f64x2.mul(half, v128.load(q, P_CURV))));
      v128.store(q, select(carried, l, taylor), P_LEAD);
      const lNew = f64x2.sub(f64x2.mul(f64x2.sub(v128.load(q, P_DIAG), lambda), l), f64x2.mul(v128.load(q - 16, P_OFFSQ), lPrev));
      lPrev = l;
      l = lNew;
    }
  }
  // Trailing determinants and the twist index (largest adjugate diagonal entry).
  const qLast = b + (last << 4);
  v128.store(qLast, one, P_TRAIL);
  let qNext = one;
  let t = f64x2.sub(v128.load(qLast, P_DIAG), lambda);
  let twist = v128.load(qLast, P_INDEX);
  let best = v128.load(qLast, P_LEAD);
  if (allTaylor) {
    best = f64x2.add(best, f64x2.add(f64x2.mul(moved, v128.load(qLast, P_SLOPE)), f64x2.mul(half, v128.load(qLast, P_CURV))));
    v128.store(qLast, best, P_LEAD);
    // pointer-stepped: q = b + 16 k
    for (let q = b + ((last - 1) << 4), end = b + ((1) << 4); q >= end; q -= 16) {
      const leadK = f64x2.add(v128.load(q, P_LEAD), f64x2.add(f64x2.mul(moved, v128.load(q, P_SLOPE)), f64x2.mul(half, v128.load(q, P_CURV))));
      v128.store(q, leadK, P_LEAD);
      v128.store(q, t, P_TRAIL);
      const weight = f64x2.mul(leadK, t);
      twist = select(v128.load(q, P_INDEX), twist, f64x2.gt(weight, best));
      best = f64x2.pmax(best, weight); // (weight > best) ? weight : best
      const tNew = f64x2.sub(f64x2.mul(f64x2.sub(v128.load(q, P_DIAG), lambda), t), f64x2.mul(v128.load(q, P_OFFSQ), qNext));
      qNext = t;
      t = tNew;
    }
    v128.store(b, t, P_TRAIL);
    const weight0 = f64x2.mul(one, t); // lead[0] = 1
    twist = select(zero, twist, f64x2.gt(weight0, best));
  } else {
    for (let k = last - 1; k >= 0; k--) {
      const q = b + (k << 4);
      v128.store(q, t, P_TRAIL);
      const weight = f64x2.mul(v128.load(q, P_LEAD), t);
      twist = select(v128.load(q, P_INDEX), twist, f64x2.gt(weight, best));
      best = f64x2.pmax(best, weight);
      const tNew = f64x2.sub(f64x2.mul(f64x2.sub(v128.load(q, P_DIAG), lambda), t), f64x2.mul(v128.load(q, P_OFFSQ), qNext));
      qNext = t;
      t = tNew;
    }
  }
  return twist;
}

/** true lanes: the last pairAdjugate column has a component that is not >= 0 */
export let adjugateNegative: v128 = f64x2.splat(0.0);

/**
 * Adjugate column at the twist into P_AMP of the workspace at b (not normalised): outward
 * products of |e_j| = psi sqrt(j + 1). Returns the squared norm per lane; sets
 * adjugateNegative.
 */
@inline export function pairAdjugate(b: i32, twist: v128, psi: v128): v128 {
  const one = f64x2.splat(1.0);
  const zero = f64x2.splat(0.0);
  const states = stateCount;
  const last = states - 1;
  const qLast = b + (last << 4);
  let norm = one;
  let negative = zero;
  const twistA = <i32>f64x2.extract_lane(twist, 0);
  const twistB = <i32>f64x2.extract_lane(twist, 1);
  if (twistA == twistB) {
    // Both lanes share the twist (the usual case): the loops of the reference, unmasked.
    const r = b + (twistA << 4);
    const invLead = f64x2.div(one, v128.load(r, P_LEAD));
    const invTrail = f64x2.div(one, v128.load(r, P_TRAIL));
    v128.store(r, one, P_AMP);
    let prod = one;
    // pointer-stepped: q = b + 16 k
    for (let q = b + ((twistA - 1) << 4), end = b + ((0) << 4); q >= end; q -= 16) {
      prod = f64x2.mul(prod, f64x2.mul(psi, v128.load(q, P_SQRTUP)));
      const x = f64x2.mul(f64x2.mul(v128.load(q, P_LEAD), invLead), prod);
      v128.store(q, x, P_AMP);
      norm = f64x2.add(norm, f64x2.mul(x, x));
      negative = v128.or(negative, v128.not(f64x2.ge(x, zero)));
    }
    prod = one;
    // pointer-stepped: q = b + 16 k
    for (let q = b + ((twistA + 1) << 4), end = b + (states << 4); q < end; q += 16) {
      prod = f64x2.mul(prod, f64x2.mul(psi, v128.load(q - 16, P_SQRTUP)));
      const x = f64x2.mul(f64x2.mul(v128.load(q, P_TRAIL), invTrail), prod);
      v128.store(q, x, P_AMP);
      norm = f64x2.add(norm, f64x2.mul(x, x));
      negative = v128.or(negative, v128.not(f64x2.ge(x, zero)));
    }
  } else {
    // Different twists: both directions for every k with lane masks. A masked-out term adds
    // +0 (x*x & 0), which leaves the sum as it is.
    const rA = b + (twistA << 4);
    const rB = b + (twistB << 4);
    const leadTwist = pair(load<f64>(rA, P_LEAD), load<f64>(rB, P_LEAD + 8));
    const trailTwist = pair(load<f64>(rA, P_TRAIL), load<f64>(rB, P_TRAIL + 8));
    const invLead = f64x2.div(one, leadTwist);
    const invTrail = f64x2.div(one, trailTwist);
    let prod = one;
    for (let k = last - 1; k >= 0; k--) {
      const q = b + (k << 4);
      const below = f64x2.lt(v128.load(q, P_INDEX), twist);
      prod = select(f64x2.mul(prod, f64x2.mul(psi, v128.load(q, P_SQRTUP))), prod, below);
      const x = f64x2.mul(f64x2.mul(v128.load(q, P_LEAD), invLead), prod);
      v128.store(q, select(x, one, below), P_AMP);
      norm = f64x2.add(norm, v128.and(f64x2.mul(x, x), below));
      negative = v128.or(negative, v128.andnot(below, f64x2.ge(x, zero)));
    }
    v128.store(qLast, one, P_AMP);
    prod = one;
    for (let k = 1; k < states; k++) {
      const q = b + (k << 4);
      const above = f64x2.gt(v128.load(q, P_INDEX), twist);
      prod = select(f64x2.mul(prod, f64x2.mul(psi, v128.load(q - 16, P_SQRTUP))), prod, above);
      const x = f64x2.mul(f64x2.mul(v128.load(q, P_TRAIL), invTrail), prod);
      v128.store(q, select(x, v128.load(q, P_AMP), above), P_AMP);
      norm = f64x2.add(norm, v128.and(f64x2.mul(x, x), above));
      negative = v128.or(negative, v128.andnot(above, f64x2.ge(x, zero)));
    }
  }
  adjugateNegative = negative;
  return norm;
}

/** Normalises P_AMP of the workspace at b by 1/sqrt(norm); returns phi = <b> per lane. */
@inline export function pairNormalise(b: i32, norm: v128): v128 {
  const one = f64x2.splat(1.0);
  const zero = f64x2.splat(0.0);
  const states = stateCount;
  const scaleAmp = f64x2.div(one, f64x2.sqrt(norm));
  let previous = f64x2.mul(v128.load(b, P_AMP), scaleAmp);
  v128.store(b, previous, P_AMP);
  let phi = zero;
  // pointer-stepped: q = b + 16 k
  for (let q = b + ((1) << 4), end = b + (states << 4); q < end; q += 16) {
    const ak = f64x2.mul(v128.load(q, P_AMP), scaleAmp);
    v128.store(q, ak, P_AMP);
    phi = f64x2.add(phi, f64x2.mul(f64x2.mul(v128.load(q - 16, P_SQRTUP), previous), ak));
    previous = ak;
  }
  return phi;
}

export let pairDensity: v128 = f64x2.splat(0.0);
export let pairDensitySq: v128 = f64x2.splat(0.0);
export let pairParityOdd: v128 = f64x2.splat(0.0);
export let pairTopWeight: v128 = f64x2.splat(0.0);

/** Site observables of both lanes from P_AMP (the operations of groundObservables). */
export function pairObservables(): void {
  const b = base;
  const states = stateCount;
  let density = f64x2.splat(0.0);
  let densitySq = f64x2.splat(0.0);
  let odd = f64x2.splat(0.0);
  for (let n = 0; n < states; n++) {
    const q = b + (n << 4);
    const a = v128.load(q, P_AMP);
    const p = f64x2.mul(a, a);
    density = f64x2.add(density, f64x2.mul(v128.load(q, P_INDEX), p));
    densitySq = f64x2.add(densitySq, f64x2.mul(f64x2.splat(<f64>(n * n)), p));
    if (n & 1) odd = f64x2.add(odd, p);
  }
  pairDensity = density;
  pairDensitySq = densitySq;
  pairParityOdd = odd;
  const top = v128.load(b + ((states - 1) << 4), P_AMP);
  pairTopWeight = f64x2.mul(top, top);
}
