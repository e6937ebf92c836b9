// Ground state of the tridiagonal site matrix for large Fock spaces (more states than
// POLYNOMIAL_PATH_MAX_STATES), where determinants could overflow: Laguerre's method on
// det(H - lambda) evaluated through the LDL^T pivots d_k(lambda) (Sturm sequence in ratio
// form; Wilkinson, The Algebraic Eigenvalue Problem, 1965, section 7.10), then the
// eigenvector from a twisted factorisation (Dhillon & Parlett, Linear Algebra Appl. 387, 1
// (2004)): top-down and bottom-up pivots, the twist index r where |gamma_r| is smallest
// (the largest component), then outward recurrences that only ever run toward decaying
// components. With psi > 0 all off-diagonals are negative, so every component of the
// ground state is positive (Perron-Frobenius) and no cancellation occurs.

import type { PolynomialStart } from './groundPolynomials.js';
import { TINY_PIVOT, type SiteWorkspace } from './siteWorkspace.js';

/**
 * Laguerre from search.start (a lower bound) on the matrix in ws.diag / ws.offSq; energy
 * in ws.eigenvalues[0], amplitudes in ws.amplitudes, phi in ws.phi.
 */
export function groundByPivots(ws: SiteWorkspace, search: PolynomialStart): void {
  const interactionU = search.interactionU;
  const psi = search.psi;
  const minDiag = search.minDiag;
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  let lambda = search.start;
  // Laguerre iteration on p(lambda) = det(H - lambda) through the pivots:
  //   d_k = a_k - lambda - e_{k-1}^2 / d_{k-1}
  //   d_k' = -1 + e_{k-1}^2 d_{k-1}' / d_{k-1}^2
  //   d_k'' = e_{k-1}^2 (d_{k-1}'' / d_{k-1}^2 - 2 d_{k-1}'^2 / d_{k-1}^3)
  //   G = p'/p = sum d_k'/d_k,  H = G^2 - p''/p = sum (d_k'/d_k)^2 - d_k''/d_k
  // Convergence is cubic, so once a step is below 1e-6 of the scale the next error is
  // below rounding and the loop can stop without another evaluation.
  const degree = states;
  const scale = Math.abs(minDiag) + Math.abs(interactionU) + psi;
  const small = 1e-6 * scale;
  const done = 4e-16 * scale;
  for (let iter = 0; iter < 100; iter++) {
    let d = diag[0] - lambda;
    if (d <= 0) break; // at or above the smallest eigenvalue: converged to rounding
    let inv = 1 / d;
    let dp = -1;
    let dpp = 0;
    let g = -inv;
    let h = inv * inv;
    let positive = true;
    for (let k = 1; k < states; k++) {
      const t = offSq[k - 1] * inv;
      const dNew = diag[k] - lambda - t;
      const tInv = t * inv;
      dpp = tInv * (dpp - 2 * dp * dp * inv);
      dp = -1 + tInv * dp;
      d = dNew;
      if (d <= 0) {
        positive = false;
        break;
      }
      inv = 1 / d;
      const r = dp * inv;
      g += r;
      h += r * r - dpp * inv;
    }
    if (!positive) break;
    // Laguerre step: lambda_new = lambda - n / (G -/+ sqrt((n-1)(n H - G^2))), with the
    // sign that maximises the denominator. G < 0 left of all zeros, so step > 0.
    const disc = (degree - 1) * (degree * h - g * g);
    const step = degree / (Math.sqrt(disc > 0 ? disc : 0) - g);
    lambda += step;
    if (!(step > small)) {
      if (step < done || iter > 0) break;
    }
  }
  ws.eigenvalues[0] = lambda;
  twistedGroundVector(ws, lambda, psi);
}

/**
 * Eigenvector of the tridiagonal matrix in ws (diag, offSq, off-diagonals -psi sqrt(k+1))
 * for the eigenvalue lambda, by a twisted factorisation; written to ws.amplitudes,
 * normalised, all components >= 0; phi = sum sqrt(n+1) c_n c_{n+1} in ws.phi.
 */
function twistedGroundVector(ws: SiteWorkspace, lambda: number, psi: number): void {
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const invTop = ws.pivotsTop;
  const invBottom = ws.pivotsBottom;
  const amp = ws.amplitudes;
  const sqrtUp = ws.sqrtUp;
  const last = states - 1;

  // Inverse pivots of the top-down and bottom-up LDL^T factorisations of H - lambda;
  // gamma_k = top_k + bottom_k - (a_k - lambda) is needed only to choose the twist.
  let top = diag[0] - lambda;
  if (top === 0) top = TINY_PIVOT;
  invTop[0] = 1 / top;
  const topPivot = ws.populations; // scratch: pivots themselves
  topPivot[0] = top;
  for (let k = 1; k < states; k++) {
    top = diag[k] - lambda - offSq[k - 1] * invTop[k - 1];
    if (top === 0) top = TINY_PIVOT;
    topPivot[k] = top;
    invTop[k] = 1 / top;
  }
  let bottom = diag[last] - lambda;
  if (bottom === 0) bottom = TINY_PIVOT;
  invBottom[last] = 1 / bottom;
  let twist = last;
  let best = Math.abs(topPivot[last]);
  for (let k = last - 1; k >= 0; k--) {
    const shifted = diag[k] - lambda;
    bottom = shifted - offSq[k] * invBottom[k + 1];
    if (bottom === 0) bottom = TINY_PIVOT;
    invBottom[k] = 1 / bottom;
    const gamma = Math.abs(topPivot[k] + bottom - shifted);
    if (gamma < best) {
      best = gamma;
      twist = k;
    }
  }
  // Off-diagonal e_k = -psi sqrt(k+1) < 0, so x_k = |e_k|/top_k x_{k+1} below the twist
  // and x_k = |e_{k-1}|/bottom_k x_{k-1} above it.
  amp[twist] = 1;
  let norm = 1;
  let x = 1;
  for (let k = twist - 1; k >= 0; k--) {
    x *= psi * sqrtUp[k] * invTop[k];
    amp[k] = x;
    norm += x * x;
  }
  x = 1;
  for (let k = twist + 1; k < states; k++) {
    x *= psi * sqrtUp[k - 1] * invBottom[k];
    amp[k] = x;
    norm += x * x;
  }
  const scaleAmp = 1 / Math.sqrt(norm);
  let phi = 0;
  amp[0] *= scaleAmp;
  for (let k = 1; k < states; k++) {
    amp[k] *= scaleAmp;
    phi += sqrtUp[k - 1] * amp[k - 1] * amp[k];
  }
  ws.phi = phi;
}
