// Thermal state of one site, scalar: an operation-for-operation port of
// src/solver/site/implicitQl.ts (tql1/tql2; Bowdler, Martin, Reinsch & Wilkinson, Numer.
// Math. 11, 293 (1968)), fullSpectrum.ts, thermalCouplings.ts (<j|b|j> by Hellmann-Feynman
// on the characteristic polynomial) and thermalState.ts, with fdlibm's exp and log
// (fdlibm.ts), so that it returns the same doubles as the JavaScript reference. The warm
// sweep path is in thermalWarm.ts.

import { fdExp, fdLog } from './fdlibm';
import { COUPL, DIAG, EIG, EVEC, OFFSQ, POP, QLOFF, SQRTUP } from './scratch';

let base: i32 = 0;
let states: i32 = 0;

export function setThermalScratch(slot: i32, stateCount: i32): void {
  base = slot;
  states = stateCount;
}

@inline function at(array: i32, k: i32): i32 {
  return base + array + (k << 3);
}
@inline function get(array: i32, k: i32): f64 {
  return load<f64>(base + array + (k << 3));
}
@inline function put(array: i32, k: i32, v: f64): void {
  store<f64>(base + array + (k << 3), v);
}

/** Implicit QL on d = EIG, e = QLOFF (n states), rotations into EVEC when withVectors. */
function implicitQl(n: i32, withVectors: bool): bool {
  const eps: f64 = 2.220446049250313e-16;
  const D = EIG;
  const Ee = QLOFF;
  let f: f64 = 0.0;
  let tst1: f64 = 0.0;
  for (let l = 0; l < n; l++) {
    const t = Math.abs(get(D, l)) + Math.abs(get(Ee, l));
    if (t > tst1) tst1 = t;
    let m = l;
    while (m < n - 1 && Math.abs(get(Ee, m)) > eps * tst1) m++;
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) return false;
        let g = get(D, l);
        let p = (get(D, l + 1) - g) / (2.0 * get(Ee, l));
        let r = Math.sqrt(p * p + 1.0);
        if (p < 0) r = -r;
        put(D, l, get(Ee, l) / (p + r));
        put(D, l + 1, get(Ee, l) * (p + r));
        const dl1 = get(D, l + 1);
        let h = g - get(D, l);
        for (let i = l + 2; i < n; i++) put(D, i, get(D, i) - h);
        f += h;
        p = get(D, m);
        let c: f64 = 1.0;
        let c2 = c;
        let c3 = c;
        const el1 = get(Ee, l + 1);
        let sn: f64 = 0.0;
        let s2: f64 = 0.0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = sn;
          g = c * get(Ee, i);
          h = c * p;
          r = Math.sqrt(p * p + get(Ee, i) * get(Ee, i));
          put(Ee, i + 1, sn * r);
          sn = get(Ee, i) / r;
          c = p / r;
          p = c * get(D, i) - sn * g;
          put(D, i + 1, h + sn * (c * g + sn * get(D, i)));
          if (withVectors) {
            for (let k = 0; k < n; k++) {
              const zk = k * n;
              h = get(EVEC, zk + i + 1);
              put(EVEC, zk + i + 1, sn * get(EVEC, zk + i) + c * h);
              put(EVEC, zk + i, c * get(EVEC, zk + i) - sn * h);
            }
          }
        }
        p = (-sn * s2 * c3 * el1 * get(Ee, l)) / dl1;
        put(Ee, l, sn * p);
        put(D, l, c * p);
      } while (Math.abs(get(Ee, l)) > eps * tst1);
    }
    put(D, l, get(D, l) + f);
    put(Ee, l, 0.0);
  }
  return true;
}

/** <j|b|j> at eigenvalue lambda of the matrix in DIAG / OFFSQ (thermalCouplings.ts). */
function couplingAt(lambda: f64, psi: f64): f64 {
  let pPrev: f64 = 1.0;
  let lPrev: f64 = 0.0;
  let sPrev: f64 = 0.0;
  let pc = get(DIAG, 0) - lambda;
  let lc: f64 = -1.0;
  let sc: f64 = 0.0;
  for (let k = 1; k < states; k++) {
    const shifted = get(DIAG, k) - lambda;
    const e2 = get(OFFSQ, k - 1);
    const pNew = shifted * pc - e2 * pPrev;
    const lNew = shifted * lc - pc - e2 * lPrev;
    const sNew = shifted * sc - 2.0 * psi * <f64>k * pPrev - e2 * sPrev;
    pPrev = pc;
    lPrev = lc;
    sPrev = sc;
    pc = pNew;
    lc = lNew;
    sc = sNew;
  }
  return (0.5 * sc) / lc;
}

/** Eigenvalue-only thermal phi (thermalCouplings.ts); spectrum in EIG, couplings in COUPL. */
export function thermalPhiByEigenvalues(interactionU: f64, muLocal: f64, psi: f64, temperature: f64): f64 {
  const n = states;
  const psiSq = psi * psi;
  let a: f64 = 0.0;
  let scale = Math.abs(interactionU) + Math.abs(muLocal) + psi;
  for (let k = 0; k < n; k++) {
    put(DIAG, k, a);
    put(EIG, k, a);
    put(OFFSQ, k, psiSq * <f64>(k + 1));
    put(QLOFF, k, k < n - 1 ? -psi * get(SQRTUP, k) : 0.0);
    a += interactionU * <f64>k - muLocal;
    if (Math.abs(get(DIAG, k)) > scale) scale = Math.abs(get(DIAG, k));
  }
  if (!implicitQl(n, false)) return NaN;
  for (let j = 1; j < n; j++) {
    const v = get(EIG, j);
    let k = j - 1;
    while (k >= 0 && get(EIG, k) > v) {
      put(EIG, k + 1, get(EIG, k));
      k--;
    }
    put(EIG, k + 1, v);
  }
  for (let j = 0; j < n; j++) put(COUPL, j, 0.0);
  const e0 = get(EIG, 0);
  const beta = 1.0 / temperature;
  let partition: f64 = 0.0;
  let phi: f64 = 0.0;
  for (let j = 0; j < n; j++) {
    const lambda = get(EIG, j);
    const x = (lambda - e0) * beta;
    if (x > 39) continue;
    for (let k = 0; k < n; k++) if (k != j && Math.abs(get(EIG, k) - lambda) < 1e-7 * scale) return NaN;
    const w = fdExp(-x);
    partition += w;
    const bj = couplingAt(lambda, psi);
    put(COUPL, j, bj);
    phi += w * bj;
  }
  return phi / partition;
}

/** Full spectrum with eigenvectors (fullSpectrum.ts): EIG ascending, EVEC row k = vector k. */
function diagonalizeSite(interactionU: f64, muLocal: f64, psi: f64): void {
  const n = states;
  const psiSq = psi * psi;
  for (let k = 0; k < n; k++) {
    put(DIAG, k, 0.5 * interactionU * <f64>k * <f64>(k - 1) - muLocal * <f64>k);
    put(OFFSQ, k, psiSq * <f64>(k + 1));
  }
  for (let i = 0; i < n; i++) {
    put(EIG, i, get(DIAG, i));
    put(QLOFF, i, i < n - 1 ? -psi * get(SQRTUP, i) : 0.0);
  }
  for (let i = 0; i < n * n; i++) put(EVEC, i, 0.0);
  for (let i = 0; i < n; i++) put(EVEC, i * n + i, 1.0);
  if (psi != 0) {
    implicitQl(n, true);
    for (let x = 0; x < n; x++) {
      for (let y = x + 1; y < n; y++) {
        const t = get(EVEC, x * n + y);
        put(EVEC, x * n + y, get(EVEC, y * n + x));
        put(EVEC, y * n + x, t);
      }
    }
  }
  for (let i = 0; i < n - 1; i++) {
    let k = i;
    let p = get(EIG, i);
    for (let j = i + 1; j < n; j++) {
      if (get(EIG, j) < p) {
        k = j;
        p = get(EIG, j);
      }
    }
    if (k != i) {
      put(EIG, k, get(EIG, i));
      put(EIG, i, p);
      for (let c = 0; c < n; c++) {
        const t = get(EVEC, i * n + c);
        put(EVEC, i * n + c, get(EVEC, k * n + c));
        put(EVEC, k * n + c, t);
      }
    }
  }
}

export let thermalEnergy: f64 = 0.0;
export let thermalDensity: f64 = 0.0;
export let thermalDensitySq: f64 = 0.0;
export let thermalParityOdd: f64 = 0.0;
export let thermalTopWeight: f64 = 0.0;
export let thermalEntropy: f64 = 0.0;

/** solveSiteThermal (thermalState.ts); observables into the thermal* globals when withObservables. */
export function solveSiteThermal(interactionU: f64, muLocal: f64, psi: f64, temperature: f64, withObservables: bool): f64 {
  if (!withObservables && psi != 0 && states <= 17) {
    const phi0 = thermalPhiByEigenvalues(interactionU, muLocal, psi, temperature);
    if (phi0 == phi0) return phi0;
  }
  diagonalizeSite(interactionU, muLocal, psi);
  const n = states;
  const beta = 1.0 / temperature;
  const e0 = get(EIG, 0);
  let partition: f64 = 0.0;
  let meanExcess: f64 = 0.0;
  let phi: f64 = 0.0;
  for (let i = 0; i < n; i++) put(POP, i, 0.0);
  for (let k = 0; k < n; k++) {
    const x = (get(EIG, k) - e0) * beta;
    if (x > 745) break;
    const w = fdExp(-x);
    partition += w;
    meanExcess += w * x;
    const row = k * n;
    let bk: f64 = 0.0;
    for (let i = 0; i < n - 1; i++) bk += get(SQRTUP, i) * get(EVEC, row + i) * get(EVEC, row + i + 1);
    phi += w * bk;
    if (withObservables) for (let i = 0; i < n; i++) put(POP, i, get(POP, i) + w * get(EVEC, row + i) * get(EVEC, row + i));
  }
  const invZ = 1.0 / partition;
  phi *= invZ;
  if (withObservables) {
    let density: f64 = 0.0;
    let densitySq: f64 = 0.0;
    let odd: f64 = 0.0;
    for (let i = 0; i < n; i++) {
      const p = get(POP, i) * invZ;
      put(POP, i, p);
      density += <f64>i * p;
      densitySq += <f64>(i * i) * p;
      if (i & 1) odd += p;
    }
    const logZ = fdLog(partition);
    thermalEnergy = e0 - temperature * logZ;
    thermalDensity = density;
    thermalDensitySq = densitySq;
    thermalParityOdd = odd;
    thermalTopWeight = get(POP, n - 1);
    thermalEntropy = logZ + meanExcess * invZ;
  }
  return phi;
}
