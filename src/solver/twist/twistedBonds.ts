// Nearest-neighbour bonds of a lattice model with a Peierls phase per axis: the hopping
// term -J_b (e^{i q_d} b_i^+ b_j + h.c.) for a bond b from site i to j = i + e_d. On a
// periodic axis of length L a phase q per bond is the twisted boundary condition with total
// twist L q spread evenly over the bonds (a gauge transformation moves it onto one bond).
//
// Each site gets the list of its neighbours with the complex coefficient of phi_j in
// psi_i = sum_j J_ij e^{i q_ij} phi_j (q_ij = +q_d forward along d, -q_d backward); the
// forward bonds are kept once more for the bond energy.

import type { LatticeModel } from '../../lattice/latticeModel.js';

export interface TwistedBonds {
  siteCount: number;
  /** neighbour slots per site (6: two per internal axis) */
  slots: number;
  /** neighbour index per slot, -1 when absent (open edge, axis of length 1, or J = 0) */
  neighbour: Int32Array;
  /** Re and Im of J_ij e^{i q_ij} per slot */
  coefRe: Float64Array;
  coefIm: Float64Array;
  /** forward bonds: from, to, J, cos q, sin q, physical axis */
  bondFrom: Int32Array;
  bondTo: Int32Array;
  bondHopping: Float64Array;
  bondCos: Float64Array;
  bondSin: Float64Array;
  bondAxis: Int32Array;
  /** 0/1 colour of each site (parity of the coordinate sum; bipartite because periodic axes are even) */
  colour: Uint8Array;
}

/** `twistPerBond[d]`: the Peierls phase q_d in radians on every bond along physical axis d. */
export function twistedBonds(model: LatticeModel, twistPerBond: readonly number[]): TwistedBonds {
  const g = model.geometry;
  if (twistPerBond.length !== g.dims) throw new RangeError(`twistPerBond: expected ${g.dims} entries, got ${twistPerBond.length}`);
  const [n0, n1, n2] = g.inner;
  const pad = 3 - g.dims;
  const N = g.siteCount;
  const slots = 6;
  const neighbour = new Int32Array(N * slots).fill(-1);
  const coefRe = new Float64Array(N * slots);
  const coefIm = new Float64Array(N * slots);
  const from: number[] = [];
  const to: number[] = [];
  const hop: number[] = [];
  const cosq: number[] = [];
  const sinq: number[] = [];
  const axisOf: number[] = [];
  const colour = new Uint8Array(N);
  const sizes = [n0, n1, n2];
  const strides = [n1 * n2, n2, 1];
  for (let i = 0; i < N; i++) {
    const c2 = i % n2;
    const r = (i - c2) / n2;
    const c1 = r % n1;
    const c0 = (r - c1) / n1;
    const c = [c0, c1, c2];
    colour[i] = (c0 + c1 + c2) & 1;
    for (let a = pad; a < 3; a++) {
      const d = a - pad;
      const L = sizes[a];
      if (L < 2) continue;
      const periodic = g.innerPeriodic[a];
      if (c[a] + 1 >= L && !periodic) continue;
      const j = c[a] + 1 >= L ? i - (L - 1) * strides[a] : i + strides[a];
      const h = model.hopping[d];
      const J = typeof h === 'number' ? h : h[i];
      if (J === 0) continue;
      const q = twistPerBond[d];
      const cs = Math.cos(q);
      const sn = q === 0 ? 0 : Math.sin(q);
      from.push(i);
      to.push(j);
      hop.push(J);
      cosq.push(cs);
      sinq.push(sn);
      axisOf.push(d);
      // forward slot of i (coefficient of phi_j) and backward slot of j (coefficient of phi_i)
      neighbour[i * slots + 2 * (a - pad)] = j;
      coefRe[i * slots + 2 * (a - pad)] = J * cs;
      coefIm[i * slots + 2 * (a - pad)] = J * sn;
      neighbour[j * slots + 2 * (a - pad) + 1] = i;
      coefRe[j * slots + 2 * (a - pad) + 1] = J * cs;
      coefIm[j * slots + 2 * (a - pad) + 1] = -J * sn;
    }
  }
  return {
    siteCount: N,
    slots,
    neighbour,
    coefRe,
    coefIm,
    bondFrom: Int32Array.from(from),
    bondTo: Int32Array.from(to),
    bondHopping: Float64Array.from(hop),
    bondCos: Float64Array.from(cosq),
    bondSin: Float64Array.from(sinq),
    bondAxis: Int32Array.from(axisOf),
    colour,
  };
}
