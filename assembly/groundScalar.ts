// Ground state of one site, scalar: an operation-for-operation port of
// src/solver/site/groundState.ts and groundPolynomials.ts (Laguerre's method on the
// characteristic polynomial from a lower bound or an estimate, eigenvector from the
// adjugate of H - lambda; Usmani, Linear Algebra Appl. 212/213, 413 (1994)), so that it
// returns the same doubles as the JavaScript reference. Up to 17 states (the reference
// switches to LDL^T pivots beyond; the kernel is not used there).

import { AMP, CURV, DIAG, LEAD, OFFSQ, SLOPE, SQRTUP, TRAIL } from './scratch';

/** Scratch slot of this instance and its Fock space (set by the kernel's configure). */
let base: i32 = 0;
let stateCount: i32 = 0;
/** ground energy of the last solve */
export let groundEnergy: f64 = 0.0;

export function setGroundScratch(slot: i32, count: i32): void {
  base = slot;
  stateCount = count;
  for (let n = 0; n < count; n++) store<f64>(slot + SQRTUP + (n << 3), Math.sqrt(<f64>(n + 1)));
}


/** phi of the ground state; energy in groundEnergy, amplitudes in the AMP scratch. */
export function solveGroundScalar(interactionU: f64, muLocal: f64, psi: f64, lowerBound: f64, estimate: f64): f64 {
  if (psi < 0) return -solveGroundScalar(interactionU, muLocal, -psi, lowerBound, estimate);
  const b = base;
  const states = stateCount;
  const psiSq = psi * psi;
  let a: f64 = 0.0;
  let minDiag: f64 = 0.0;
  let gersh: f64 = Infinity;
  for (let n = 0; n < states; n++) {
    store<f64>(b + ((n) << 3), a, DIAG);
    store<f64>(b + ((n) << 3), psiSq * <f64>(n + 1), OFFSQ);
    if (a < minDiag) minDiag = a;
    a += interactionU * <f64>n - muLocal;
  }
  if (psi == 0) {
    let best = 0;
    for (let n = 1; n < states; n++) if (load<f64>(b + ((n) << 3), DIAG) < load<f64>(b + ((best) << 3), DIAG)) best = n;
    for (let n = 0; n < states; n++) store<f64>(b + (n << 3), 0.0, AMP);
    store<f64>(b + ((best) << 3), 1.0, AMP);
    groundEnergy = load<f64>(b + ((best) << 3), DIAG);
    return 0.0;
  }
  let lambda = lowerBound;
  if (!(lambda == lambda)) {
    for (let n = 0; n < states; n++) {
      const radius = psi * ((n > 0 ? load<f64>(b + ((n - 1) << 3), SQRTUP) : 0.0) + (n < states - 1 ? load<f64>(b + ((n) << 3), SQRTUP) : 0.0));
      const g = load<f64>(b + ((n) << 3), DIAG) - radius;
      if (g < gersh) gersh = g;
    }
    lambda = gersh - 1e-12 * (Math.abs(gersh) + 1.0);
  }
  if (estimate == estimate) {
    const phi = groundByPolynomials(interactionU, psi, estimate, minDiag, false);
    if (polynomialAccepted) return phi;
  }
  return groundByPolynomials(interactionU, psi, lambda, minDiag, true);
}

/** false after groundByPolynomials from an estimate whose vector is not the ground state */
let polynomialAccepted: bool = true;

/** phi; sets polynomialAccepted (see groundPolynomials.ts). */
function groundByPolynomials(interactionU: f64, psi: f64, start: f64, minDiag: f64, startIsLowerBound: bool): f64 {
  const b = base;
  const states = stateCount;
  const degree = <f64>states;
  const degreeLess = <f64>(states - 1);
  const scale = Math.abs(minDiag) + Math.abs(interactionU) + psi;
  const small = 1e-6 * scale;
  let lambda = start;
  let leadAt: f64 = NaN;
  store<f64>(b + ((0) << 3), 1.0, LEAD);
  for (let iter = 0; iter < 100; iter++) {
    let pPrev: f64 = 1.0;
    let dPrev: f64 = 0.0;
    let ddPrev: f64 = 0.0;
    let p = load<f64>(b + ((0) << 3), DIAG) - lambda;
    let d: f64 = -1.0;
    let dd: f64 = 0.0;
    leadAt = lambda;
    for (let k = 1; k < states; k++) {
      store<f64>(b + ((k) << 3), p, LEAD);
      store<f64>(b + ((k) << 3), d, SLOPE);
      store<f64>(b + ((k) << 3), dd, CURV);
      const shifted = load<f64>(b + ((k) << 3), DIAG) - lambda;
      const e2 = load<f64>(b + ((k - 1) << 3), OFFSQ);
      const pNew = shifted * p - e2 * pPrev;
      const dNew = shifted * d - p - e2 * dPrev;
      const ddNew = shifted * dd - 2.0 * d - e2 * ddPrev;
      pPrev = p;
      dPrev = d;
      ddPrev = dd;
      p = pNew;
      d = dNew;
      dd = ddNew;
    }
    if (startIsLowerBound ? !(p > 0) : p == 0) break;
    const invP = 1.0 / p;
    const g = d * invP;
    const h = g * g - dd * invP;
    const disc = degreeLess * (degree * h - g * g);
    const root = Math.sqrt(disc > 0 ? disc : 0.0);
    const step = -degree / (g < 0 ? g - root : g + root);
    lambda += step;
    if (!(Math.abs(step) > small)) break;
  }
  groundEnergy = lambda;

  const moved = lambda - leadAt;
  if (Math.abs(moved) <= 1e-5 * scale) {
    const half = 0.5 * moved * moved;
    for (let k = 1; k < states; k++) {
      store<f64>(b + ((k) << 3), load<f64>(b + ((k) << 3), LEAD) + (moved * load<f64>(b + ((k) << 3), SLOPE) + half * load<f64>(b + ((k) << 3), CURV)), LEAD);
    }
  } else {
    let pPrev: f64 = 1.0;
    let p = load<f64>(b + ((0) << 3), DIAG) - lambda;
    for (let k = 1; k < states; k++) {
      store<f64>(b + ((k) << 3), p, LEAD);
      const pNew = (load<f64>(b + ((k) << 3), DIAG) - lambda) * p - load<f64>(b + ((k - 1) << 3), OFFSQ) * pPrev;
      pPrev = p;
      p = pNew;
    }
  }
  const last = states - 1;
  store<f64>(b + ((last) << 3), 1.0, TRAIL);
  let qNext: f64 = 1.0;
  let q = load<f64>(b + ((last) << 3), DIAG) - lambda;
  let twist = last;
  let best = load<f64>(b + ((last) << 3), LEAD);
  for (let k = last - 1; k >= 0; k--) {
    store<f64>(b + ((k) << 3), q, TRAIL);
    const weight = load<f64>(b + ((k) << 3), LEAD) * q;
    if (weight > best) {
      best = weight;
      twist = k;
    }
    const qNew = (load<f64>(b + ((k) << 3), DIAG) - lambda) * q - load<f64>(b + ((k) << 3), OFFSQ) * qNext;
    qNext = q;
    q = qNew;
  }
  store<f64>(b + ((twist) << 3), 1.0, AMP);
  let norm: f64 = 1.0;
  const invLead = 1.0 / load<f64>(b + ((twist) << 3), LEAD);
  let prod: f64 = 1.0;
  for (let k = twist - 1; k >= 0; k--) {
    prod *= psi * load<f64>(b + ((k) << 3), SQRTUP);
    const x = load<f64>(b + ((k) << 3), LEAD) * invLead * prod;
    store<f64>(b + ((k) << 3), x, AMP);
    norm += x * x;
  }
  const invTrail = 1.0 / load<f64>(b + ((twist) << 3), TRAIL);
  prod = 1.0;
  for (let k = twist + 1; k < states; k++) {
    prod *= psi * load<f64>(b + ((k - 1) << 3), SQRTUP);
    const x = load<f64>(b + ((k) << 3), TRAIL) * invTrail * prod;
    store<f64>(b + ((k) << 3), x, AMP);
    norm += x * x;
  }
  if (!startIsLowerBound) {
    for (let k = 0; k < states; k++) {
      if (!(load<f64>(b + ((k) << 3), AMP) >= 0)) {
        polynomialAccepted = false;
        return NaN;
      }
    }
  }
  polynomialAccepted = true;
  const scaleAmp = 1.0 / Math.sqrt(norm);
  let phi: f64 = 0.0;
  store<f64>(b + ((0) << 3), load<f64>(b + ((0) << 3), AMP) * scaleAmp, AMP);
  for (let k = 1; k < states; k++) {
    const ak = load<f64>(b + ((k) << 3), AMP) * scaleAmp;
    store<f64>(b + ((k) << 3), ak, AMP);
    phi += load<f64>(b + ((k - 1) << 3), SQRTUP) * load<f64>(b + ((k - 1) << 3), AMP) * ak;
  }
  return phi;
}

/** Observables of the ground state in AMP (port of groundObservables.ts). */
export let obsDensity: f64 = 0.0;
export let obsDensitySq: f64 = 0.0;
export let obsParityOdd: f64 = 0.0;
export let obsTopWeight: f64 = 0.0;

export function groundObservables(): void {
  const b = base;
  const states = stateCount;
  let density: f64 = 0.0;
  let densitySq: f64 = 0.0;
  let odd: f64 = 0.0;
  for (let n = 0; n < states; n++) {
    const a = load<f64>(b + ((n) << 3), AMP);
    const p = a * a;
    density += <f64>n * p;
    densitySq += <f64>(n * n) * p;
    if (n & 1) odd += p;
  }
  obsDensity = density;
  obsDensitySq = densitySq;
  obsParityOdd = odd;
  const top = load<f64>(b + ((states - 1) << 3), AMP);
  obsTopWeight = top * top;
}
