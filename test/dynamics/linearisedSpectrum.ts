// The linearised Gutzwiller equations around a uniform stationary state for one
// quasi-momentum (formula in linear-spectrum.test.ts), built from the formula alone (no code
// under test) and diagonalised with ml-matrix's general EigenvalueDecomposition.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

/**
 * Positive angular frequencies (ascending) of the mode with sum_j cos(k.r_j) = gammaK cos(k.r_i)
 * around the real site ground state c0 (hbar = 1, same units as U, J, mu).
 */
export function linearisedFrequencies(c0: Float64Array, U: number, J: number, mu: number, gammaK: number, z: number): number[] {
  const S = c0.length;
  let phi0 = 0;
  for (let m = 0; m + 1 < S; m++) phi0 += Math.sqrt(m + 1) * c0[m] * c0[m + 1];
  const psi0 = z * J * phi0;
  const d = (n: number) => 0.5 * U * n * (n - 1) - mu * n;
  // lambda = <c0|H0|c0>
  let lambda = 0;
  for (let n = 0; n < S; n++) {
    let h = d(n) * c0[n];
    if (n > 0) h -= psi0 * Math.sqrt(n) * c0[n - 1];
    if (n + 1 < S) h -= psi0 * Math.sqrt(n + 1) * c0[n + 1];
    lambda += c0[n] * h;
  }
  const M = new Matrix(2 * S, 2 * S);
  for (let col = 0; col < 2 * S; col++) {
    const ar = new Float64Array(S);
    const ai = new Float64Array(S);
    if (col < S) ar[col] = 1;
    else ai[col - S] = 1;
    let dr = 0;
    let di = 0;
    for (let m = 0; m + 1 < S; m++) {
      // c0_m a_{m+1} + conj(a_m) c0_{m+1}
      dr += Math.sqrt(m + 1) * (c0[m] * ar[m + 1] + ar[m] * c0[m + 1]);
      di += Math.sqrt(m + 1) * (c0[m] * ai[m + 1] - ai[m] * c0[m + 1]);
    }
    for (let n = 0; n < S; n++) {
      let hr = (d(n) - lambda) * ar[n];
      let hi = (d(n) - lambda) * ai[n];
      if (n > 0) {
        hr -= psi0 * Math.sqrt(n) * ar[n - 1] + J * gammaK * dr * Math.sqrt(n) * c0[n - 1];
        hi -= psi0 * Math.sqrt(n) * ai[n - 1] + J * gammaK * di * Math.sqrt(n) * c0[n - 1];
      }
      if (n + 1 < S) {
        hr -= psi0 * Math.sqrt(n + 1) * ar[n + 1] + J * gammaK * dr * Math.sqrt(n + 1) * c0[n + 1];
        hi -= psi0 * Math.sqrt(n + 1) * ai[n + 1] - J * gammaK * di * Math.sqrt(n + 1) * c0[n + 1];
      }
      // da/dt = -i h
      M.set(n, col, hi);
      M.set(S + n, col, -hr);
    }
  }
  const eig = new EigenvalueDecomposition(M);
  const re = eig.realEigenvalues;
  const im = eig.imaginaryEigenvalues;
  // The two zero modes (site phase, site norm) form a Jordan block whose eigenvalues the
  // general solver returns as +-1e-8: rounding of a defective pair, not an instability.
  for (const r of re) if (Math.abs(r) > 1e-6) throw new Error(`unstable mode: real part ${r}`);
  return im.filter((w) => w > 1e-6).sort((a, b) => a - b);
}

