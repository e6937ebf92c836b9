// Ground state of the tridiagonal site matrix through the characteristic polynomials of its
// leading and trailing blocks (three-term Sturm recurrences; Wilkinson, The Algebraic
// Eigenvalue Problem, 1965, section 5.37), which need no division per entry, unlike the
// pivot form:
//   p_k = (a_k - lambda) p_{k-1} - e_{k-1}^2 p_{k-2},   p_{-1} = 1,
// with first and second derivatives in lambda for Laguerre's method. At the eigenvalue,
// the adjugate of H - lambda is proportional to x x^T, and for a tridiagonal matrix its
// entries are products of leading (p) and trailing (q) determinants and off-diagonals
// (Usmani, Linear Algebra Appl. 212/213, 413 (1994)):
//   adj_kk = p_{k-1} q_{k+1},  adj_kr = p_{k-1} q_{r+1} prod_{j=k}^{r-1} |e_j|  (k <= r).
// The column r of the largest diagonal entry gives the eigenvector from determinants of
// blocks that exclude the dominant occupation, which are well conditioned.

import type { SiteWorkspace } from './siteWorkspace.js';

/** Where the Laguerre search starts, and the scale of the matrix (set by solveGround). */
export class PolynomialStart {
  interactionU = NaN;
  /** psi >= 0 */
  psi = NaN;
  /** starting lambda: a lower bound to the ground energy, or an estimate of it */
  start = NaN;
  /** smallest diagonal entry (<= 0) */
  minDiag = NaN;
}

/**
 * Laguerre from search.start on the matrix in ws.diag / ws.offSq, then the eigenvector
 * from the adjugate; phi in ws.phi, amplitudes in ws.amplitudes, energy in
 * ws.eigenvalues[0]. With `startIsLowerBound` false the start is only an estimate, and the
 * result is rejected (false returned) when the vector has a negative component, i.e. is
 * not the ground state.
 */
export function groundByPolynomials(ws: SiteWorkspace, search: PolynomialStart, startIsLowerBound: boolean): boolean {
  const interactionU = search.interactionU;
  const psi = search.psi;
  const start = search.start;
  const minDiag = search.minDiag;
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const degree = states;
  const scale = Math.abs(minDiag) + Math.abs(interactionU) + psi;
  const small = 1e-6 * scale;
  const lead = ws.pivotsTop;
  const leadSlope = ws.leadSlope;
  const leadCurvature = ws.leadCurvature;
  let lambda = start;
  // lead[] holds the leading determinants at leadAt, with their first two derivatives. After
  // the last (small) Laguerre step they are carried to the new lambda by a second-order
  // Taylor step instead of a new recurrence: the error is O(step^3), below rounding when
  // the step is below 1e-5 of the scale.
  let leadAt = NaN;
  lead[0] = 1;
  for (let iter = 0; iter < 100; iter++) {
    let pPrev = 1;
    let dPrev = 0;
    let ddPrev = 0;
    let p = diag[0] - lambda;
    let d = -1;
    let dd = 0;
    leadAt = lambda;
    for (let k = 1; k < states; k++) {
      lead[k] = p;
      leadSlope[k] = d;
      leadCurvature[k] = dd;
      const shifted = diag[k] - lambda;
      const e2 = offSq[k - 1];
      const pNew = shifted * p - e2 * pPrev;
      const dNew = shifted * d - p - e2 * dPrev;
      const ddNew = shifted * dd - 2 * d - e2 * ddPrev;
      pPrev = p;
      dPrev = d;
      ddPrev = dd;
      p = pNew;
      d = dNew;
      dd = ddNew;
    }
    // From a lower bound, p <= 0 means the smallest eigenvalue is reached to rounding.
    if (startIsLowerBound ? !(p > 0) : p === 0) break;
    const invP = 1 / p;
    const g = d * invP;
    const h = g * g - dd * invP;
    const disc = (degree - 1) * (degree * h - g * g);
    const root = Math.sqrt(disc > 0 ? disc : 0);
    // Laguerre: lambda_new = lambda - n / (G +- sqrt(...)), the sign that maximises |denominator|.
    const step = -degree / (g < 0 ? g - root : g + root);
    lambda += step;
    // Cubic convergence: after a step below 1e-6 of the scale the error is ~1e-18.
    if (!(Math.abs(step) > small)) break;
  }
  ws.eigenvalues[0] = lambda;

  // Leading determinants p_{k-1} stored at lead[k] (lead[0] = 1), trailing q_{k+1} at
  // trail[k] (trail[states-1] = 1).
  const trail = ws.pivotsBottom;
  const moved = lambda - leadAt;
  if (Math.abs(moved) <= 1e-5 * scale) {
    const half = 0.5 * moved * moved;
    for (let k = 1; k < states; k++) lead[k] += moved * leadSlope[k] + half * leadCurvature[k];
  } else {
    let pPrev = 1;
    let p = diag[0] - lambda;
    for (let k = 1; k < states; k++) {
      lead[k] = p;
      const pNew = (diag[k] - lambda) * p - offSq[k - 1] * pPrev;
      pPrev = p;
      p = pNew;
    }
  }
  const last = states - 1;
  trail[last] = 1;
  let qNext = 1;
  let q = diag[last] - lambda;
  let twist = last;
  let best = lead[last];
  for (let k = last - 1; k >= 0; k--) {
    trail[k] = q;
    const weight = lead[k] * q;
    if (weight > best) {
      best = weight;
      twist = k;
    }
    const qNew = (diag[k] - lambda) * q - offSq[k] * qNext;
    qNext = q;
    q = qNew;
  }
  const amp = ws.amplitudes;
  const sqrtUp = ws.sqrtUp;
  // x_k / x_r = (p_{k-1}/p_{r-1}) prod_{j=k}^{r-1} |e_j|   (k < r)
  //           = (q_{k+1}/q_{r+1}) prod_{j=r}^{k-1} |e_j|   (k > r)
  amp[twist] = 1;
  let norm = 1;
  const invLead = 1 / lead[twist];
  let prod = 1;
  for (let k = twist - 1; k >= 0; k--) {
    prod *= psi * sqrtUp[k];
    const x = lead[k] * invLead * prod;
    amp[k] = x;
    norm += x * x;
  }
  const invTrail = 1 / trail[twist];
  prod = 1;
  for (let k = twist + 1; k < states; k++) {
    prod *= psi * sqrtUp[k - 1];
    const x = trail[k] * invTrail * prod;
    amp[k] = x;
    norm += x * x;
  }
  if (!startIsLowerBound) {
    // The ground state has no negative component; anything else is an excited state.
    for (let k = 0; k < states; k++) if (!(amp[k] >= 0)) return false;
  }
  const scaleAmp = 1 / Math.sqrt(norm);
  let phi = 0;
  amp[0] *= scaleAmp;
  for (let k = 1; k < states; k++) {
    amp[k] *= scaleAmp;
    phi += sqrtUp[k - 1] * amp[k - 1] * amp[k];
  }
  ws.phi = phi;
  return true;
}
