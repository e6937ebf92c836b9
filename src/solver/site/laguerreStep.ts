// One Laguerre step toward an eigenvalue of the tridiagonal site matrix in ws.diag /
// ws.offSq (Wilkinson, The Algebraic Eigenvalue Problem, 1965, section 7.10): p, p' and p''
// by the three-term recurrence p_k = (a_k - lambda) p_{k-1} - e_{k-1}^2 p_{k-2}, then
//   lambda_new - lambda = -n / (G +- sqrt((n-1)(nH - G^2))),  G = p'/p, H = G^2 - p''/p.
// (The ground-state path, groundPolynomials.ts, keeps its own inline copy: it also stores
// the leading determinants and runs once per site update in the hottest loop.)

import type { SiteWorkspace } from './siteWorkspace.js';

/** The Laguerre step from lambda; 0 when p(lambda) = 0. */
export function laguerreStep(ws: SiteWorkspace, lambda: number): number {
  const n = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  let pPrev = 1;
  let dPrev = 0;
  let ddPrev = 0;
  let p = diag[0] - lambda;
  let d = -1;
  let dd = 0;
  for (let k = 1; k < n; k++) {
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
  if (p === 0) return 0;
  const invP = 1 / p;
  const g = d * invP;
  const h = g * g - dd * invP;
  const disc = (n - 1) * (n * h - g * g);
  const root = Math.sqrt(disc > 0 ? disc : 0);
  return -n / (g < 0 ? g - root : g + root);
}
