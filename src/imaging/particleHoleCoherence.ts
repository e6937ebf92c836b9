// Optional strong-coupling correction to the coherence of Mott regions: the nearest-neighbour
// correlations <b_i^+ b_j> carried by virtual particle-hole pairs, which the site-decoupled
// (Gutzwiller) state leaves out (its Mott sites are exact Fock states, phi = 0, so they show
// no interference at all). Off by default; the pictures and the visibility say when it is on.
//
// First-order perturbation theory in J around the Fock state |..., n, n, ...> (the mechanism
// of Gerbier et al., PRL 95, 050404 (2005), "coherent admixture of particle/hole pairs"; the
// formula below is derived here): hopping b_i^+ b_j creates |n + 1_i, n - 1_j> at energy
// U + eps_i - eps_j above the Fock state, so
//     <b_i^+ b_j> = n (n + 1) J_ij [1 / (U + eps_i - eps_j) + 1 / (U - eps_i + eps_j)],
// which is 2 n (n + 1) J / U on a flat lattice (the particle-hole admixture), real and
// symmetric. Tested against exact diagonalisation of small Bose-Hubbard rings.
//
// Used only for bonds whose two sites are Mott sites of the same filling n (as classified) and
// whose potential step |eps_i - eps_j| is below U / 2 (farther from resonance the expansion is
// not controlled). Sites at a shell's rim keep a small proximity-induced phi, whose product
// Re(phi_i^* phi_j) already stands for part of this coherence in the mean-field pictures; when
// phi is given, only the excess max(0, c - Re(phi_i^* phi_j)) is added, so the bond's total
// coherence is the larger of the two and nothing is counted twice. Wrap-around bonds of periodic boundaries are left out (the two sites are
// not neighbours in the picture). Bonds along the imaging axis add nothing to a column
// picture: integrated over k_z, e^{i k_z a} |w~(k_z)|^2 is the overlap of neighbouring Wannier
// functions, zero (momentumStructureFactor.ts). Corrections of second order (density shifts,
// next-nearest coherence ~ J^2 / U^2) are left out.
//
// Far field: a bond of coherence c along image axis d adds 2 c cos(k_d a) to
// B(k) = sum_ij e^{i k.(r_i - r_j)} <b_i^+ b_j>, whatever its position, so only the sums per
// axis matter (withBondCoherence). Finite flight: freeExpansion.ts uses the per-column arrays.

import { columnProjection } from '../lattice/columnProjection.js';
import { gridSizes } from '../lattice/gridShape.js';
import type { MomentumStructureFactor } from '../observables/momentumStructureFactor.js';

export interface ParticleHoleInput {
  /** Lattice shape, 1 to 3 axes (first axis slowest). */
  shape: readonly number[];
  /** Integer filling of Mott sites, 0 elsewhere (SiteClassification.mottFilling). */
  mottFilling: Int32Array;
  /** Hopping per physical axis: uniform or per bond (bond i -> i + e_d at index i), as in LatticeModel. */
  hopping: ReadonlyArray<number | Float64Array>;
  /** On-site interaction, uniform or per site, in the same energy unit as the hopping. */
  interactionU: number | Float64Array;
  /** Site potential (same unit); omit for a flat lattice. */
  sitePotential?: Float64Array;
  /** Order parameter per site (real and optional imaginary part): only the excess over Re(phi_i^* phi_j) is added. */
  phiRe?: Float64Array;
  phiIm?: Float64Array;
  /** Periodic boundary per physical axis; wrap-around bonds are skipped. */
  periodic?: readonly boolean[];
  /** Lattice axis the camera looks along (0, 1 or 2); default 2. */
  imagingAxis?: 0 | 1 | 2;
}

/** Bond coherences summed along the imaging axis, on the grid of the two kept axes. */
export interface BondCoherenceColumns {
  /** At u * lv + v: sum over layers of <b^+ b> on the bond (u, v) -> (u + 1, v). */
  alongU: Float64Array;
  /** At u * lv + v: the same for the bond (u, v) -> (u, v + 1). */
  alongV: Float64Array;
  sumU: number;
  sumV: number;
  /** Bonds given a coherence, bonds skipped near resonance, bonds along the imaging axis (no effect). */
  bondsUsed: number;
  bondsSkippedNearResonance: number;
  bondsAlongImagingAxis: number;
}

export function particleHoleBondCoherence(input: ParticleHoleInput): BondCoherenceColumns {
  const n = gridSizes(input.shape, 'particleHoleBondCoherence');
  const dims = input.shape.length;
  const sites = n[0] * n[1] * n[2];
  const { mottFilling, hopping, interactionU, sitePotential } = input;
  if (mottFilling.length !== sites) throw new RangeError(`particleHoleBondCoherence: mottFilling must hold ${sites} values`);
  if (hopping.length !== dims) throw new RangeError(`particleHoleBondCoherence: hopping needs one entry per lattice axis (${dims})`);
  if ((input.phiRe !== undefined && input.phiRe.length !== sites) || (input.phiIm !== undefined && input.phiIm.length !== sites)) {
    throw new RangeError(`particleHoleBondCoherence: phiRe and phiIm must hold ${sites} values`);
  }
  if (sitePotential !== undefined && sitePotential.length !== sites) {
    throw new RangeError(`particleHoleBondCoherence: sitePotential must hold ${sites} values`);
  }
  const axis = input.imagingAxis ?? 2;
  const { kept, lu, lv } = columnProjection(n, axis);
  const strides = [n[1] * n[2], n[2], 1];
  const alongU = new Float64Array(lu * lv);
  const alongV = new Float64Array(lu * lv);
  let bondsUsed = 0;
  let bondsSkippedNearResonance = 0;
  let bondsAlongImagingAxis = 0;
  const coords = [0, 0, 0];
  for (let d = 0; d < dims; d++) {
    const h = hopping[d];
    for (let i = 0; i < sites; i++) {
      const filling = mottFilling[i];
      if (filling <= 0) continue;
      coords[0] = Math.floor(i / strides[0]);
      coords[1] = Math.floor(i / strides[1]) % n[1];
      coords[2] = i % n[2];
      if (coords[d] + 1 >= n[d]) continue; // open end, or a wrap-around bond of a periodic axis
      const j = i + strides[d];
      if (mottFilling[j] !== filling) continue;
      if (d === axis) {
        bondsAlongImagingAxis++;
        continue;
      }
      const J = typeof h === 'number' ? h : h[i];
      const U = typeof interactionU === 'number' ? interactionU : 0.5 * (interactionU[i] + interactionU[j]);
      const delta = sitePotential === undefined ? 0 : sitePotential[i] - sitePotential[j];
      if (!(Math.abs(delta) < 0.5 * U)) {
        bondsSkippedNearResonance++;
        continue;
      }
      let c = filling * (filling + 1) * J * (1 / (U + delta) + 1 / (U - delta));
      if (input.phiRe !== undefined) {
        const meanField = input.phiRe[i] * input.phiRe[j] + (input.phiIm === undefined ? 0 : input.phiIm[i] * input.phiIm[j]);
        c = Math.max(0, c - meanField);
        if (c === 0) continue;
      }
      const cell = coords[kept[0]] * lv + coords[kept[1]];
      if (d === kept[0]) alongU[cell] += c;
      else alongV[cell] += c;
      bondsUsed++;
    }
  }
  let sumU = 0;
  let sumV = 0;
  for (let k = 0; k < lu * lv; k++) {
    sumU += alongU[k];
    sumV += alongV[k];
  }
  return { alongU, alongV, sumU, sumV, bondsUsed, bondsSkippedNearResonance, bondsAlongImagingAxis };
}

/**
 * The structure factor with the bond term added: B(k) += 2 sumU cos(k_u a) + 2 sumV cos(k_v a)
 * at every sample k = 2 pi (p, q) / (M a). The zone average of the added term is zero, so the
 * atom number is unchanged (the correction moves atoms in momentum space, it adds none).
 */
export function withBondCoherence(structure: MomentumStructureFactor, bonds: BondCoherenceColumns): MomentumStructureFactor {
  const m = structure.samplesPerZone;
  const power = Float64Array.from(structure.coherentPower);
  const cos = new Float64Array(m);
  for (let p = 0; p < m; p++) cos[p] = Math.cos((2 * Math.PI * p) / m);
  for (let p = 0; p < m; p++) {
    const rowTerm = 2 * bonds.sumU * cos[p];
    for (let q = 0; q < m; q++) power[p * m + q] += rowTerm + 2 * bonds.sumV * cos[q];
  }
  return { ...structure, coherentPower: power };
}
