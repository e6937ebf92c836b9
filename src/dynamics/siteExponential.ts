// Exact propagation of one site under a frozen mean field: c_i <- exp(-i rate H_i tau) c_i
// with Psi_i held fixed. This is the building block of the red-black splitting
// (redBlackSplitting.ts): with the other colour frozen, Psi_i of a site is constant, so the
// flow of that colour is linear and solved exactly, and the update is unitary (every
// site's norm is kept to rounding).
//
// H_i is Hermitian tridiagonal with off-diagonals -Psi sqrt(n+1) (below) and -Psi^* sqrt(n+1)
// (above). With Psi = |Psi| e^{i theta} and W = diag(e^{i n theta}), W^+ H_i W is the real
// symmetric site matrix of the static problem at psi = |Psi| (src/solver/site), whose
// eigenpairs (lambda_k, v_k) come from implicit QL (diagonalizeSite). Then
//   exp(-i rate H_i tau) = W V exp(-i rate Lambda tau) V^T W^+.

import { createSiteWorkspace, diagonalizeSite, type SiteWorkspace } from '../solver/site/index.js';
import type { DynamicsFrame } from './dynamicsFrame.js';

export interface ExponentialWorkspace {
  site: SiteWorkspace;
  /** cos(n theta), sin(n theta), and two complex work vectors */
  scratch: Float64Array;
}

export function createExponentialWorkspace(nmax: number): ExponentialWorkspace {
  return { site: createSiteWorkspace(nmax), scratch: new Float64Array(6 * (nmax + 1)) };
}

/**
 * Sites of `colour` ((x + y + z) % 2 in internal coordinates) in [siteStart, siteEnd):
 * c_i <- exp(-i rate H_i tau) c_i at the given Psi_i (from meanFieldRange).
 */
export function propagateColourRange(
  frame: DynamicsFrame,
  y: Float64Array,
  psiRe: Float64Array,
  psiIm: Float64Array,
  colour: number,
  tau: number,
  work: ExponentialWorkspace,
  siteStart: number,
  siteEnd: number,
): void {
  const S = frame.states;
  const n1 = frame.inner[1];
  const n2 = frame.inner[2];
  const ws = work.site;
  const w = work.scratch;
  const cosN = 0;
  const sinN = S;
  const tr = 2 * S;
  const ti = 3 * S;
  const ar = 4 * S;
  const ai = 5 * S;
  const lambda = ws.eigenvalues;
  const vec = ws.eigenvectors;
  const uArr = frame.interactionArray;
  const uScale = frame.interactionScale;
  const uUni = uScale * frame.interactionU;
  const phase = frame.rate * tau;
  if (siteEnd <= siteStart) return;
  const rowFirst = Math.floor(siteStart / n2);
  const rowLast = Math.floor((siteEnd - 1) / n2);
  for (let row = rowFirst; row <= rowLast; row++) {
    const a = (row / n1) | 0;
    const b = row - a * n1;
    const base = row * n2;
    const cFrom = Math.max(0, siteStart - base);
    const cTo = Math.min(n2, siteEnd - base);
    const first = cFrom + (((a + b + cFrom + colour) & 1) === 0 ? 0 : 1);
    for (let c = first; c < cTo; c += 2) {
      const i = base + c;
      const u = uArr === null ? uUni : uScale * uArr[i];
      const pr = psiRe[i];
      const pi = psiIm[i];
      const modulus = Math.sqrt(pr * pr + pi * pi);
      diagonalizeSite(ws, u, frame.mu - frame.eps[i], modulus);
      // e^{i n theta} by the recurrence of (cos, sin); theta = 0 when Psi = 0.
      const ct = modulus > 0 ? pr / modulus : 1;
      const st = modulus > 0 ? pi / modulus : 0;
      w[cosN] = 1;
      w[sinN] = 0;
      for (let n = 1; n < S; n++) {
        w[cosN + n] = w[cosN + n - 1] * ct - w[sinN + n - 1] * st;
        w[sinN + n] = w[sinN + n - 1] * ct + w[cosN + n - 1] * st;
      }
      const off = 2 * i * S;
      // c~ = W^+ c
      for (let n = 0; n < S; n++) {
        const xr = y[off + 2 * n];
        const xi = y[off + 2 * n + 1];
        const cn = w[cosN + n];
        const sn = w[sinN + n];
        w[tr + n] = cn * xr + sn * xi;
        w[ti + n] = cn * xi - sn * xr;
      }
      // a = exp(-i phase Lambda) V^T c~   (row k of vec is eigenvector k)
      for (let k = 0; k < S; k++) {
        let sr = 0;
        let si = 0;
        const row = k * S;
        for (let n = 0; n < S; n++) {
          const v = vec[row + n];
          sr += v * w[tr + n];
          si += v * w[ti + n];
        }
        const angle = phase * lambda[k];
        const ca = Math.cos(angle);
        const sa = Math.sin(angle);
        w[ar + k] = ca * sr + sa * si;
        w[ai + k] = ca * si - sa * sr;
      }
      // c = W V a
      for (let n = 0; n < S; n++) {
        let sr = 0;
        let si = 0;
        for (let k = 0; k < S; k++) {
          const v = vec[k * S + n];
          sr += v * w[ar + k];
          si += v * w[ai + k];
        }
        const cn = w[cosN + n];
        const sn = w[sinN + n];
        y[off + 2 * n] = cn * sr - sn * si;
        y[off + 2 * n + 1] = cn * si + sn * sr;
      }
    }
  }
}
