// The time-dependent Gutzwiller equations of the Bose-Hubbard model (Jaksch, Venturi, Cirac,
// Williams & Zoller, PRL 89, 040402 (2002); Zakrzewski, PRA 71, 043601 (2005)): the
// stationary points of the action with a product-state ansatz give, site by site,
//
//   i dc_{i,n}/dt = rate * sum_m (H_i)_{nm} c_{i,m},
//   (H_i c)_n = d_n c_n - Psi_i sqrt(n) c_{n-1} - Psi_i^* sqrt(n+1) c_{n+1},
//   d_n = U_i n(n-1)/2 + (eps_i - mu) n,   Psi_i = sum_{j nn i} J_ij phi_j,
//   phi_j = <b_j> = sum_n sqrt(n+1) c_{j,n}^* c_{j,n+1},
//
// i.e. dE/dc^*_{i,n} with E the mean-field energy. H_i is Hermitian, so every site's norm is
// conserved, and E (and the atom number) under a static Hamiltonian.
//
// Three passes, each over a range of sites [siteStart, siteEnd), reading and writing flat
// arrays only (no allocation): (1) orderParameterRange: phi_i from the site's own amplitudes;
// (2) meanFieldRange: Psi_i from the neighbours' phi (needs pass 1 finished everywhere);
// (3) hamiltonianActionRange: dc/dt from the site's own amplitudes and Psi_i. Passes 2 and 3
// on one range need no barrier between them. Every value depends only on the inputs, never on
// how the sites are split, so any split among threads gives bit-identical results.

import type { DynamicsFrame } from './dynamicsFrame.js';

/** phi_i = sum_n sqrt(n+1) c_n^* c_{n+1} for sites [siteStart, siteEnd). */
export function orderParameterRange(
  y: Float64Array,
  states: number,
  sqrtN: Float64Array,
  phiRe: Float64Array,
  phiIm: Float64Array,
  siteStart: number,
  siteEnd: number,
): void {
  for (let i = siteStart; i < siteEnd; i++) {
    let base = 2 * i * states;
    let re = 0;
    let im = 0;
    let ar = y[base];
    let ai = y[base + 1];
    for (let n = 1; n < states; n++) {
      base += 2;
      const br = y[base];
      const bi = y[base + 1];
      const s = sqrtN[n];
      re += s * (ar * br + ai * bi);
      im += s * (ar * bi - ai * br);
      ar = br;
      ai = bi;
    }
    phiRe[i] = re;
    phiIm[i] = im;
  }
}

/**
 * Psi_i = sum_j J_ij(t) phi_j for sites [siteStart, siteEnd) (all of them when colour < 0,
 * else only those with (x + y + z) % 2 === colour in internal coordinates).
 */
export function meanFieldRange(
  frame: DynamicsFrame,
  phiRe: Float64Array,
  phiIm: Float64Array,
  psiRe: Float64Array,
  psiIm: Float64Array,
  colour: number,
  siteStart: number,
  siteEnd: number,
): void {
  const n0 = frame.inner[0];
  const n1 = frame.inner[1];
  const n2 = frame.inner[2];
  const s0 = n1 * n2;
  const p0 = frame.innerPeriodic[0];
  const p1 = frame.innerPeriodic[1];
  const p2 = frame.innerPeriodic[2];
  const h0 = frame.hopArrays[0];
  const h1 = frame.hopArrays[1];
  const h2 = frame.hopArrays[2];
  const sc0 = frame.hopScale[0];
  const sc1 = frame.hopScale[1];
  const sc2 = frame.hopScale[2];
  const j0 = sc0 * frame.hopUniform[0];
  const j1 = sc1 * frame.hopUniform[1];
  const j2 = sc2 * frame.hopUniform[2];
  if (siteEnd <= siteStart) return;
  const rowFirst = Math.floor(siteStart / n2);
  const rowLast = Math.floor((siteEnd - 1) / n2);
  for (let row = rowFirst; row <= rowLast; row++) {
    const a = (row / n1) | 0;
    const b = row - a * n1;
    const base = row * n2;
    // Neighbour offsets along the two outer axes; a missing neighbour (open edge or an axis
    // of length 1) gets offset 0 and weight 0.
    const up0 = a + 1 < n0 ? s0 : p0 && n0 > 1 ? -(n0 - 1) * s0 : 0;
    const dn0 = a > 0 ? -s0 : p0 && n0 > 1 ? (n0 - 1) * s0 : 0;
    const wu0 = a + 1 < n0 || (p0 && n0 > 1) ? 1 : 0;
    const wd0 = a > 0 || (p0 && n0 > 1) ? 1 : 0;
    const up1 = b + 1 < n1 ? n2 : p1 && n1 > 1 ? -(n1 - 1) * n2 : 0;
    const dn1 = b > 0 ? -n2 : p1 && n1 > 1 ? (n1 - 1) * n2 : 0;
    const wu1 = b + 1 < n1 || (p1 && n1 > 1) ? 1 : 0;
    const wd1 = b > 0 || (p1 && n1 > 1) ? 1 : 0;
    const cFrom = Math.max(0, siteStart - base);
    const cTo = Math.min(n2, siteEnd - base);
    const parity = (a + b) & 1;
    for (let c = cFrom; c < cTo; c++) {
      if (colour >= 0 && ((parity + c) & 1) !== colour) continue;
      const i = base + c;
      const up2 = c + 1 < n2 ? 1 : p2 && n2 > 1 ? -(n2 - 1) : 0;
      const dn2 = c > 0 ? -1 : p2 && n2 > 1 ? n2 - 1 : 0;
      const wu2 = up2 === 0 ? 0 : 1;
      const wd2 = dn2 === 0 ? 0 : 1;
      // Bond i -> i + e is stored at i, bond i -> i - e at the neighbour's index.
      const ju0 = wu0 * (h0 === null ? j0 : sc0 * h0[i]);
      const jd0 = wd0 * (h0 === null ? j0 : sc0 * h0[i + dn0]);
      const ju1 = wu1 * (h1 === null ? j1 : sc1 * h1[i]);
      const jd1 = wd1 * (h1 === null ? j1 : sc1 * h1[i + dn1]);
      const ju2 = wu2 * (h2 === null ? j2 : sc2 * h2[i]);
      const jd2 = wd2 * (h2 === null ? j2 : sc2 * h2[i + dn2]);
      psiRe[i] =
        ju0 * phiRe[i + up0] + jd0 * phiRe[i + dn0] + ju1 * phiRe[i + up1] + jd1 * phiRe[i + dn1] + ju2 * phiRe[i + up2] + jd2 * phiRe[i + dn2];
      psiIm[i] =
        ju0 * phiIm[i + up0] + jd0 * phiIm[i + dn0] + ju1 * phiIm[i + up1] + jd1 * phiIm[i + dn1] + ju2 * phiIm[i + up2] + jd2 * phiIm[i + dn2];
    }
  }
}

/** dc/dt = -i rate H_i c_i for sites [siteStart, siteEnd), given Psi_i. */
export function hamiltonianActionRange(
  frame: DynamicsFrame,
  y: Float64Array,
  psiRe: Float64Array,
  psiIm: Float64Array,
  out: Float64Array,
  siteStart: number,
  siteEnd: number,
): void {
  const S = frame.states;
  const sqrtN = frame.sqrtN;
  const eps = frame.eps;
  const mu = frame.mu;
  const rate = frame.rate;
  const uArr = frame.interactionArray;
  const uScale = frame.interactionScale;
  const uUni = uScale * frame.interactionU;
  for (let i = siteStart; i < siteEnd; i++) {
    const u = uArr === null ? uUni : uScale * uArr[i];
    const e = eps[i] - mu;
    const pr = psiRe[i];
    const pi = psiIm[i];
    const base = 2 * i * S;
    // Rolling window c_{n-1}, c_n, c_{n+1}; d_{n+1} = d_n + U n + (eps - mu).
    let ar = 0;
    let ai = 0;
    let xr = y[base];
    let xi = y[base + 1];
    let d = 0;
    for (let n = 0; n < S; n++) {
      const k = base + 2 * n;
      const last = n + 1 === S;
      const br = last ? 0 : y[k + 2];
      const bi = last ? 0 : y[k + 3];
      const sl = sqrtN[n];
      const su = sqrtN[n + 1];
      const hr = d * xr - sl * (pr * ar - pi * ai) - su * (pr * br + pi * bi);
      const hi = d * xi - sl * (pr * ai + pi * ar) - su * (pr * bi - pi * br);
      out[k] = rate * hi;
      out[k + 1] = -rate * hr;
      d += u * n + e;
      ar = xr;
      ai = xi;
      xr = br;
      xi = bi;
    }
  }
}
