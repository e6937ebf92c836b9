// Ground states of four sites of one colour at once: two independent f64x2 pairs (sites
// i, i + 2 in the first pair workspace, i + 4, i + 6 in the second), their operations
// interleaved statement by statement. Each lane performs exactly the operations of
// groundPair.ts (and so of the scalar reference), in the same order; only the schedule
// differs: the three-term recurrences, the divisions and square roots of one site update
// form long dependency chains, and two pairs side by side give the processor independent
// work to overlap with them (instruction-level parallelism). The uncommon branches (a pair
// that needs the determinants recomputed, or lanes with different twist indices) run the
// pair code's functions on that pair alone.

import { groundEnergy, solveGroundScalar } from './groundScalar';
import { adjugateNegative, pair, pairAdjugate, pairTrailing, select } from './groundPair';
import { PAIR_SET, P_AMP, P_CURV, P_DIAG, P_INDEX, P_LEAD, P_OFFSQ, P_RADIUS, P_SLOPE, P_SQRTUP, P_TRAIL } from './scratch';
import { epsPtr, f64At, interactionAt, lowerPtr, phiPtr, psiPrevPtr } from './lattice';

/** the second pair workspace, relative to the first (immediate offsets) */
const Q: i32 = PAIR_SET;

let base: i32 = 0;
let stateCount: i32 = 0;

export function setQuadScratch(slot: i32, count: i32): void {
  base = slot;
  stateCount = count;
}

// phi and ground energy per site of the last solveGroundQuad, sites i, i + 2, i + 4, i + 6
export let quadPhi0: f64 = 0.0;
export let quadPhi1: f64 = 0.0;
export let quadPhi2: f64 = 0.0;
export let quadPhi3: f64 = 0.0;
export let quadEnergy0: f64 = 0.0;
export let quadEnergy1: f64 = 0.0;
export let quadEnergy2: f64 = 0.0;
export let quadEnergy3: f64 = 0.0;

/** solveGroundQuad results */
export const QUAD_NOT_APPLICABLE = 0;
export const QUAD_SOLVED = 1;

// How often each path ran (read by the kernel tests, to see every branch compared).
export let quadSolved: i32 = 0;
export let quadSplitTrailing: i32 = 0;
export let quadSplitAdjugate: i32 = 0;
export let quadLaneFallbacks: i32 = 0;

/**
 * Sweep update of sites i, i + 2, i + 4, i + 6 (mean fields psi0..psi3), started as in the
 * reference: warm from the stored lower energies (Hellmann-Feynman estimate, Weyl bound as
 * the fall-back) or, when none of them has one yet, cold from Gershgorin's bound. Returns
 * QUAD_NOT_APPLICABLE (nothing done) when some psi is not > 0 or the four sites do not all
 * start alike; the caller then solves them as two pairs.
 */
export function solveGroundQuad(i: i32, psi0: f64, psi1: f64, psi2: f64, psi3: f64, mu: f64, coupling: f64): i32 {
  if (!(psi0 > 0) || !(psi1 > 0) || !(psi2 > 0) || !(psi3 > 0)) return QUAD_NOT_APPLICABLE;
  const prev0 = f64At(lowerPtr, i);
  const prev1 = f64At(lowerPtr, i + 2);
  const prev2 = f64At(lowerPtr, i + 4);
  const prev3 = f64At(lowerPtr, i + 6);
  const cold = !(prev0 == prev0);
  if (cold == (prev1 == prev1) || cold == (prev2 == prev2) || cold == (prev3 == prev3)) return QUAD_NOT_APPLICABLE;
  const b = base;
  const states = stateCount;
  const last = states - 1;
  const one = f64x2.splat(1.0);
  const zero = f64x2.splat(0.0);
  const muSplat = f64x2.splat(mu);
  const couplingSplat = f64x2.splat(coupling);
  const tiny = f64x2.splat(1e-12);
  const two = f64x2.splat(2.0);
  // pair P: sites i, i + 2; pair R: sites i + 4, i + 6 (workspace b + Q)
  const uP = pair(interactionAt(i), interactionAt(i + 2));
  const uR = pair(interactionAt(i + 4), interactionAt(i + 6));
  const muP = f64x2.sub(muSplat, pair(f64At(epsPtr, i), f64At(epsPtr, i + 2)));
  const muR = f64x2.sub(muSplat, pair(f64At(epsPtr, i + 4), f64At(epsPtr, i + 6)));
  const psiP = pair(psi0, psi1);
  const psiR = pair(psi2, psi3);
  const prevP = pair(prev0, prev1);
  const prevR = pair(prev2, prev3);
  const dPsiP = f64x2.sub(psiP, pair(f64At(psiPrevPtr, i), f64At(psiPrevPtr, i + 2)));
  const dPsiR = f64x2.sub(psiR, pair(f64At(psiPrevPtr, i + 4), f64At(psiPrevPtr, i + 6)));
  const phiOldP = pair(f64At(phiPtr, i), f64At(phiPtr, i + 2));
  const phiOldR = pair(f64At(phiPtr, i + 4), f64At(phiPtr, i + 6));
  // bound = prev - |dPsi| coupling - 1e-12 (|prev| + u); estimate = prev - 2 phi dPsi
  const boundP = f64x2.sub(f64x2.sub(prevP, f64x2.mul(f64x2.abs(dPsiP), couplingSplat)), f64x2.mul(tiny, f64x2.add(f64x2.abs(prevP), uP)));
  const boundR = f64x2.sub(f64x2.sub(prevR, f64x2.mul(f64x2.abs(dPsiR), couplingSplat)), f64x2.mul(tiny, f64x2.add(f64x2.abs(prevR), uR)));
  const psiSqP = f64x2.mul(psiP, psiP);
  const psiSqR = f64x2.mul(psiR, psiR);

  let lambdaP = f64x2.sub(prevP, f64x2.mul(f64x2.mul(two, phiOldP), dPsiP));
  let lambdaR = f64x2.sub(prevR, f64x2.mul(f64x2.mul(two, phiOldR), dPsiR));
  let minDiagP = zero;
  let minDiagR = zero;
  let pP = zero;
  let pR = zero;
  let dP = f64x2.splat(-1.0);
  let dR = dP;
  let ddP = zero;
  let ddR = zero;
  v128.store(b, one, P_LEAD);
  v128.store(b, one, P_LEAD + Q);
  if (!cold) {
    // First Laguerre evaluation at the estimates, building the diagonals on the way (as
    // solveGroundPair).
    v128.store(b, zero, P_DIAG);
    v128.store(b, zero, P_DIAG + Q);
    let aP = f64x2.sub(f64x2.mul(uP, zero), muP);
    let aR = f64x2.sub(f64x2.mul(uR, zero), muR);
    pP = f64x2.sub(zero, lambdaP);
    pR = f64x2.sub(zero, lambdaR);
    let pPrevP = one;
    let pPrevR = one;
    let dPrevP = zero;
    let dPrevR = zero;
    let ddPrevP = zero;
    let ddPrevR = zero;
    for (let q = b + 16, end = b + (states << 4); q < end; q += 16) {
      const index = v128.load(q, P_INDEX);
      v128.store(q, pP, P_LEAD);
      v128.store(q, pR, P_LEAD + Q);
      v128.store(q, dP, P_SLOPE);
      v128.store(q, dR, P_SLOPE + Q);
      v128.store(q, ddP, P_CURV);
      v128.store(q, ddR, P_CURV + Q);
      v128.store(q, aP, P_DIAG);
      v128.store(q, aR, P_DIAG + Q);
      minDiagP = f64x2.pmin(minDiagP, aP);
      minDiagR = f64x2.pmin(minDiagR, aR);
      const e2P = f64x2.mul(psiSqP, index);
      const e2R = f64x2.mul(psiSqR, index);
      v128.store(q - 16, e2P, P_OFFSQ);
      v128.store(q - 16, e2R, P_OFFSQ + Q);
      const shiftedP = f64x2.sub(aP, lambdaP);
      const shiftedR = f64x2.sub(aR, lambdaR);
      aP = f64x2.add(aP, f64x2.sub(f64x2.mul(uP, index), muP));
      aR = f64x2.add(aR, f64x2.sub(f64x2.mul(uR, index), muR));
      const pNewP = f64x2.sub(f64x2.mul(shiftedP, pP), f64x2.mul(e2P, pPrevP));
      const pNewR = f64x2.sub(f64x2.mul(shiftedR, pR), f64x2.mul(e2R, pPrevR));
      const dNewP = f64x2.sub(f64x2.sub(f64x2.mul(shiftedP, dP), pP), f64x2.mul(e2P, dPrevP));
      const dNewR = f64x2.sub(f64x2.sub(f64x2.mul(shiftedR, dR), pR), f64x2.mul(e2R, dPrevR));
      const ddNewP = f64x2.sub(f64x2.sub(f64x2.mul(shiftedP, ddP), f64x2.add(dP, dP)), f64x2.mul(e2P, ddPrevP));
      const ddNewR = f64x2.sub(f64x2.sub(f64x2.mul(shiftedR, ddR), f64x2.add(dR, dR)), f64x2.mul(e2R, ddPrevR));
      pPrevP = pP;
      pPrevR = pR;
      dPrevP = dP;
      dPrevR = dR;
      ddPrevP = ddP;
      ddPrevR = ddR;
      pP = pNewP;
      pR = pNewR;
      dP = dNewP;
      dR = dNewR;
      ddP = ddNewP;
      ddR = ddNewR;
    }
  } else {
    // Cold: the diagonals, then Gershgorin's lower bounds with the reference's slack.
    let aP = zero;
    let aR = zero;
    let gershP = f64x2.splat(Infinity);
    let gershR = gershP;
    for (let q = b, end = b + (states << 4); q < end; q += 16) {
      const indexUp = v128.load(q + 16, P_INDEX);
      const index = v128.load(q, P_INDEX);
      const radius = v128.load(q, P_RADIUS);
      v128.store(q, aP, P_DIAG);
      v128.store(q, aR, P_DIAG + Q);
      v128.store(q, f64x2.mul(psiSqP, indexUp), P_OFFSQ);
      v128.store(q, f64x2.mul(psiSqR, indexUp), P_OFFSQ + Q);
      minDiagP = f64x2.pmin(minDiagP, aP);
      minDiagR = f64x2.pmin(minDiagR, aR);
      gershP = f64x2.pmin(gershP, f64x2.sub(aP, f64x2.mul(psiP, radius)));
      gershR = f64x2.pmin(gershR, f64x2.sub(aR, f64x2.mul(psiR, radius)));
      aP = f64x2.add(aP, f64x2.sub(f64x2.mul(uP, index), muP));
      aR = f64x2.add(aR, f64x2.sub(f64x2.mul(uR, index), muR));
    }
    lambdaP = f64x2.sub(gershP, f64x2.mul(tiny, f64x2.add(f64x2.abs(gershP), one)));
    lambdaR = f64x2.sub(gershR, f64x2.mul(tiny, f64x2.add(f64x2.abs(gershR), one)));
  }
  let leadAtP = lambdaP;
  let leadAtR = lambdaR;
  const degree = f64x2.splat(<f64>states);
  const degreeLess = f64x2.splat(<f64>last);
  const minusDegree = f64x2.splat(-<f64>states);
  const scaleP = f64x2.add(f64x2.add(f64x2.abs(minDiagP), f64x2.abs(uP)), psiP);
  const scaleR = f64x2.add(f64x2.add(f64x2.abs(minDiagR), f64x2.abs(uR)), psiR);
  const smallP = f64x2.mul(f64x2.splat(1e-6), scaleP);
  const smallR = f64x2.mul(f64x2.splat(1e-6), scaleR);
  let activeP = f64x2.eq(zero, zero);
  let activeR = activeP;
  // Laguerre steps of both pairs until every lane has stopped; a stopped lane (or pair)
  // keeps its lambda and stored determinants through later evaluations (masks).
  for (let iter = 0; iter < 100; iter++) {
    if (iter > 0 || cold) {
      let pPrevP = one;
      let pPrevR = one;
      let dPrevP = zero;
      let dPrevR = zero;
      let ddPrevP = zero;
      let ddPrevR = zero;
      pP = f64x2.sub(zero, lambdaP);
      pR = f64x2.sub(zero, lambdaR);
      dP = f64x2.splat(-1.0);
      dR = dP;
      ddP = zero;
      ddR = zero;
      for (let q = b + 16, end = b + (states << 4); q < end; q += 16) {
        v128.store(q, select(pP, v128.load(q, P_LEAD), activeP), P_LEAD);
        v128.store(q, select(pR, v128.load(q, P_LEAD + Q), activeR), P_LEAD + Q);
        v128.store(q, select(dP, v128.load(q, P_SLOPE), activeP), P_SLOPE);
        v128.store(q, select(dR, v128.load(q, P_SLOPE + Q), activeR), P_SLOPE + Q);
        v128.store(q, select(ddP, v128.load(q, P_CURV), activeP), P_CURV);
        v128.store(q, select(ddR, v128.load(q, P_CURV + Q), activeR), P_CURV + Q);
        const shiftedP = f64x2.sub(v128.load(q, P_DIAG), lambdaP);
        const shiftedR = f64x2.sub(v128.load(q, P_DIAG + Q), lambdaR);
        const e2P = v128.load(q - 16, P_OFFSQ);
        const e2R = v128.load(q - 16, P_OFFSQ + Q);
        const pNewP = f64x2.sub(f64x2.mul(shiftedP, pP), f64x2.mul(e2P, pPrevP));
        const pNewR = f64x2.sub(f64x2.mul(shiftedR, pR), f64x2.mul(e2R, pPrevR));
        const dNewP = f64x2.sub(f64x2.sub(f64x2.mul(shiftedP, dP), pP), f64x2.mul(e2P, dPrevP));
        const dNewR = f64x2.sub(f64x2.sub(f64x2.mul(shiftedR, dR), pR), f64x2.mul(e2R, dPrevR));
        const ddNewP = f64x2.sub(f64x2.sub(f64x2.mul(shiftedP, ddP), f64x2.add(dP, dP)), f64x2.mul(e2P, ddPrevP));
        const ddNewR = f64x2.sub(f64x2.sub(f64x2.mul(shiftedR, ddR), f64x2.add(dR, dR)), f64x2.mul(e2R, ddPrevR));
        pPrevP = pP;
        pPrevR = pR;
        dPrevP = dP;
        dPrevR = dR;
        ddPrevP = ddP;
        ddPrevR = ddR;
        pP = pNewP;
        pR = pNewR;
        dP = dNewP;
        dR = dNewR;
        ddP = ddNewP;
        ddR = ddNewR;
      }
    }
    const steppingP = cold ? v128.and(activeP, f64x2.gt(pP, zero)) : v128.andnot(activeP, f64x2.eq(pP, zero));
    const steppingR = cold ? v128.and(activeR, f64x2.gt(pR, zero)) : v128.andnot(activeR, f64x2.eq(pR, zero));
    const invPP = f64x2.div(one, pP);
    const invPR = f64x2.div(one, pR);
    const gP = f64x2.mul(dP, invPP);
    const gR = f64x2.mul(dR, invPR);
    const hP = f64x2.sub(f64x2.mul(gP, gP), f64x2.mul(ddP, invPP));
    const hR = f64x2.sub(f64x2.mul(gR, gR), f64x2.mul(ddR, invPR));
    const discP = f64x2.mul(degreeLess, f64x2.sub(f64x2.mul(degree, hP), f64x2.mul(gP, gP)));
    const discR = f64x2.mul(degreeLess, f64x2.sub(f64x2.mul(degree, hR), f64x2.mul(gR, gR)));
    const rootP = f64x2.sqrt(f64x2.pmax(zero, discP));
    const rootR = f64x2.sqrt(f64x2.pmax(zero, discR));
    const stepP = f64x2.div(minusDegree, select(f64x2.sub(gP, rootP), f64x2.add(gP, rootP), f64x2.lt(gP, zero)));
    const stepR = f64x2.div(minusDegree, select(f64x2.sub(gR, rootR), f64x2.add(gR, rootR), f64x2.lt(gR, zero)));
    lambdaP = select(f64x2.add(lambdaP, stepP), lambdaP, steppingP);
    lambdaR = select(f64x2.add(lambdaR, stepR), lambdaR, steppingR);
    activeP = v128.and(steppingP, f64x2.gt(f64x2.abs(stepP), smallP));
    activeR = v128.and(steppingR, f64x2.gt(f64x2.abs(stepR), smallR));
    if (!v128.any_true(v128.or(activeP, activeR))) break;
    leadAtP = select(lambdaP, leadAtP, activeP);
    leadAtR = select(lambdaR, leadAtR, activeR);
  }

  // Leading determinants carried to lambda by the Taylor step inside the trailing pass
  // (both pairs, every lane moved little: the usual case) or by pairTrailing per pair.
  const movedP = f64x2.sub(lambdaP, leadAtP);
  const movedR = f64x2.sub(lambdaR, leadAtR);
  const limit = f64x2.splat(1e-5);
  const allTaylor =
    i64x2.all_true(f64x2.le(f64x2.abs(movedP), f64x2.mul(limit, scaleP))) && i64x2.all_true(f64x2.le(f64x2.abs(movedR), f64x2.mul(limit, scaleR)));
  let twistP: v128;
  let twistR: v128;
  if (allTaylor) {
    const halfP = f64x2.mul(f64x2.mul(f64x2.splat(0.5), movedP), movedP);
    const halfR = f64x2.mul(f64x2.mul(f64x2.splat(0.5), movedR), movedR);
    const qLast = b + (last << 4);
    v128.store(qLast, one, P_TRAIL);
    v128.store(qLast, one, P_TRAIL + Q);
    let qNextP = one;
    let qNextR = one;
    let tP = f64x2.sub(v128.load(qLast, P_DIAG), lambdaP);
    let tR = f64x2.sub(v128.load(qLast, P_DIAG + Q), lambdaR);
    const indexLast = v128.load(qLast, P_INDEX);
    twistP = indexLast;
    twistR = indexLast;
    let bestP = f64x2.add(v128.load(qLast, P_LEAD), f64x2.add(f64x2.mul(movedP, v128.load(qLast, P_SLOPE)), f64x2.mul(halfP, v128.load(qLast, P_CURV))));
    let bestR = f64x2.add(v128.load(qLast, P_LEAD + Q), f64x2.add(f64x2.mul(movedR, v128.load(qLast, P_SLOPE + Q)), f64x2.mul(halfR, v128.load(qLast, P_CURV + Q))));
    v128.store(qLast, bestP, P_LEAD);
    v128.store(qLast, bestR, P_LEAD + Q);
    for (let q = b + ((last - 1) << 4), end = b + 16; q >= end; q -= 16) {
      const index = v128.load(q, P_INDEX);
      const leadP = f64x2.add(v128.load(q, P_LEAD), f64x2.add(f64x2.mul(movedP, v128.load(q, P_SLOPE)), f64x2.mul(halfP, v128.load(q, P_CURV))));
      const leadR = f64x2.add(v128.load(q, P_LEAD + Q), f64x2.add(f64x2.mul(movedR, v128.load(q, P_SLOPE + Q)), f64x2.mul(halfR, v128.load(q, P_CURV + Q))));
      v128.store(q, leadP, P_LEAD);
      v128.store(q, leadR, P_LEAD + Q);
      v128.store(q, tP, P_TRAIL);
      v128.store(q, tR, P_TRAIL + Q);
      const weightP = f64x2.mul(leadP, tP);
      const weightR = f64x2.mul(leadR, tR);
      twistP = select(index, twistP, f64x2.gt(weightP, bestP));
      twistR = select(index, twistR, f64x2.gt(weightR, bestR));
      bestP = f64x2.pmax(bestP, weightP);
      bestR = f64x2.pmax(bestR, weightR);
      const tNewP = f64x2.sub(f64x2.mul(f64x2.sub(v128.load(q, P_DIAG), lambdaP), tP), f64x2.mul(v128.load(q, P_OFFSQ), qNextP));
      const tNewR = f64x2.sub(f64x2.mul(f64x2.sub(v128.load(q, P_DIAG + Q), lambdaR), tR), f64x2.mul(v128.load(q, P_OFFSQ + Q), qNextR));
      qNextP = tP;
      qNextR = tR;
      tP = tNewP;
      tR = tNewR;
    }
    v128.store(b, tP, P_TRAIL);
    v128.store(b, tR, P_TRAIL + Q);
    twistP = select(zero, twistP, f64x2.gt(f64x2.mul(one, tP), bestP)); // lead[0] = 1
    twistR = select(zero, twistR, f64x2.gt(f64x2.mul(one, tR), bestR));
  } else {
    quadSplitTrailing++;
    twistP = pairTrailing(b, lambdaP, leadAtP, scaleP);
    twistR = pairTrailing(b + Q, lambdaR, leadAtR, scaleR);
  }

  // Adjugate columns: one shared twist (the usual case) in one interleaved pass, else per pair.
  const twist = <i32>f64x2.extract_lane(twistP, 0);
  let normP = one;
  let normR = one;
  let negativeP = zero;
  let negativeR = zero;
  if (twist == <i32>f64x2.extract_lane(twistP, 1) && twist == <i32>f64x2.extract_lane(twistR, 0) && twist == <i32>f64x2.extract_lane(twistR, 1)) {
    const r = b + (twist << 4);
    const invLeadP = f64x2.div(one, v128.load(r, P_LEAD));
    const invLeadR = f64x2.div(one, v128.load(r, P_LEAD + Q));
    const invTrailP = f64x2.div(one, v128.load(r, P_TRAIL));
    const invTrailR = f64x2.div(one, v128.load(r, P_TRAIL + Q));
    v128.store(r, one, P_AMP);
    v128.store(r, one, P_AMP + Q);
    let prodP = one;
    let prodR = one;
    for (let q = r - 16; q >= b; q -= 16) {
      const sqrtUp = v128.load(q, P_SQRTUP);
      prodP = f64x2.mul(prodP, f64x2.mul(psiP, sqrtUp));
      prodR = f64x2.mul(prodR, f64x2.mul(psiR, sqrtUp));
      const xP = f64x2.mul(f64x2.mul(v128.load(q, P_LEAD), invLeadP), prodP);
      const xR = f64x2.mul(f64x2.mul(v128.load(q, P_LEAD + Q), invLeadR), prodR);
      v128.store(q, xP, P_AMP);
      v128.store(q, xR, P_AMP + Q);
      normP = f64x2.add(normP, f64x2.mul(xP, xP));
      normR = f64x2.add(normR, f64x2.mul(xR, xR));
      negativeP = v128.or(negativeP, v128.not(f64x2.ge(xP, zero)));
      negativeR = v128.or(negativeR, v128.not(f64x2.ge(xR, zero)));
    }
    prodP = one;
    prodR = one;
    for (let q = r + 16, end = b + (states << 4); q < end; q += 16) {
      const sqrtUp = v128.load(q - 16, P_SQRTUP);
      prodP = f64x2.mul(prodP, f64x2.mul(psiP, sqrtUp));
      prodR = f64x2.mul(prodR, f64x2.mul(psiR, sqrtUp));
      const xP = f64x2.mul(f64x2.mul(v128.load(q, P_TRAIL), invTrailP), prodP);
      const xR = f64x2.mul(f64x2.mul(v128.load(q, P_TRAIL + Q), invTrailR), prodR);
      v128.store(q, xP, P_AMP);
      v128.store(q, xR, P_AMP + Q);
      normP = f64x2.add(normP, f64x2.mul(xP, xP));
      normR = f64x2.add(normR, f64x2.mul(xR, xR));
      negativeP = v128.or(negativeP, v128.not(f64x2.ge(xP, zero)));
      negativeR = v128.or(negativeR, v128.not(f64x2.ge(xR, zero)));
    }
  } else {
    quadSplitAdjugate++;
    normP = pairAdjugate(b, twistP, psiP);
    negativeP = adjugateNegative;
    normR = pairAdjugate(b + Q, twistR, psiR);
    negativeR = adjugateNegative;
  }

  // Normalisation and phi = sum_k sqrt(k + 1) a_k a_{k+1} (the sweep needs no amplitudes).
  const scaleAmpP = f64x2.div(one, f64x2.sqrt(normP));
  const scaleAmpR = f64x2.div(one, f64x2.sqrt(normR));
  let previousP = f64x2.mul(v128.load(b, P_AMP), scaleAmpP);
  let previousR = f64x2.mul(v128.load(b, P_AMP + Q), scaleAmpR);
  let phiP = zero;
  let phiR = zero;
  for (let q = b + 16, end = b + (states << 4); q < end; q += 16) {
    const sqrtUp = v128.load(q - 16, P_SQRTUP);
    const akP = f64x2.mul(v128.load(q, P_AMP), scaleAmpP);
    const akR = f64x2.mul(v128.load(q, P_AMP + Q), scaleAmpR);
    phiP = f64x2.add(phiP, f64x2.mul(f64x2.mul(sqrtUp, previousP), akP));
    phiR = f64x2.add(phiR, f64x2.mul(f64x2.mul(sqrtUp, previousR), akR));
    previousP = akP;
    previousR = akR;
  }
  quadSolved++;
  quadPhi0 = f64x2.extract_lane(phiP, 0);
  quadPhi1 = f64x2.extract_lane(phiP, 1);
  quadPhi2 = f64x2.extract_lane(phiR, 0);
  quadPhi3 = f64x2.extract_lane(phiR, 1);
  quadEnergy0 = f64x2.extract_lane(lambdaP, 0);
  quadEnergy1 = f64x2.extract_lane(lambdaP, 1);
  quadEnergy2 = f64x2.extract_lane(lambdaR, 0);
  quadEnergy3 = f64x2.extract_lane(lambdaR, 1);
  // A lane on an excited state: the scalar path from its Weyl bound, as in the reference.
  if (cold || !v128.any_true(v128.or(negativeP, negativeR))) return QUAD_SOLVED;
  if (i64x2.extract_lane(negativeP, 0) != 0) {
    quadLaneFallbacks++;
    quadPhi0 = solveGroundScalar(f64x2.extract_lane(uP, 0), f64x2.extract_lane(muP, 0), psi0, f64x2.extract_lane(boundP, 0), NaN);
    quadEnergy0 = groundEnergy;
  }
  if (i64x2.extract_lane(negativeP, 1) != 0) {
    quadLaneFallbacks++;
    quadPhi1 = solveGroundScalar(f64x2.extract_lane(uP, 1), f64x2.extract_lane(muP, 1), psi1, f64x2.extract_lane(boundP, 1), NaN);
    quadEnergy1 = groundEnergy;
  }
  if (i64x2.extract_lane(negativeR, 0) != 0) {
    quadLaneFallbacks++;
    quadPhi2 = solveGroundScalar(f64x2.extract_lane(uR, 0), f64x2.extract_lane(muR, 0), psi2, f64x2.extract_lane(boundR, 0), NaN);
    quadEnergy2 = groundEnergy;
  }
  if (i64x2.extract_lane(negativeR, 1) != 0) {
    quadLaneFallbacks++;
    quadPhi3 = solveGroundScalar(f64x2.extract_lane(uR, 1), f64x2.extract_lane(muR, 1), psi3, f64x2.extract_lane(boundR, 1), NaN);
    quadEnergy3 = groundEnergy;
  }
  return QUAD_SOLVED;
}
