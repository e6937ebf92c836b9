// Lattice part of the far-field momentum distribution of a Gutzwiller state
// (Gerbier et al., PRL 95, 050404 (2005); DESIGN.md section 4):
//
//   n(k) = |w~(k)|^2 B(k),   B(k) = sum_{ij} e^{i k.(r_i - r_j)} <b_i^+ b_j>
//        = |sum_i e^{-i k.r_i} phi_i|^2 + sum_i (n_i - |phi_i|^2)
//
// (<b_i^+ b_j> = phi_i^* phi_j for i != j in the product state). DESIGN.md writes the
// first term as |sum_i e^{i k.r_i} phi_i|^2; for real phi the two are the same, for
// complex phi the sign above is the one that puts a condensate phi_i = e^{i q.r_i}
// (momentum +hbar q) at k = +q.
//
// The first term is the coherent (condensate) part, periodic in k with the reciprocal
// lattice; the second is the incoherent part, flat in k because the product state has
// no correlations <b_i^+ b_j> - phi_i^* phi_j between different sites.
//
// Column (3D) geometry: the camera sees n(k) integrated over k along the imaging axis.
// For true Wannier functions, integral dk_z |w~(k_z)|^2 e^{i k_z a (z - z')} / (2 pi) is
// the overlap of w(z) and w(z - a (z - z')), which is zero for z != z' (Wannier functions
// at different sites are orthogonal). So the cross terms between layers drop out and
//   integral dk_z n(k) / (2 pi) = |w~(k_x, k_y)|^2 [ sum_layers |sum_{i in layer} e^{i k.r_i} phi_i|^2 + sum_i (n_i - |phi_i|^2) ]:
// each layer along the imaging axis interferes with itself only. That is what we compute.
//
// Product states have no connected correlations between sites; the optional strong-coupling
// correction of Mott bonds (imaging/particleHoleCoherence.ts, withBondCoherence) adds its
// 2 c cos(k.d) terms to coherentPower afterwards.
//
// Numerics: B is sampled on one Brillouin zone with M points per axis,
// k = 2 pi p / (M a), p = 0 .. M - 1, by a zero-padded 2D FFT (fft.js, M a power of
// two, M >= lattice length); fft.js computes sum_r x_r e^{-i k r}, which is the sum
// above with x = phi. Discrete Parseval: sum over the M^2 samples of B = M^2 N exactly.

import { ComplexFft2d, isPowerOfTwo, nextPowerOfTwo } from '../numerics/fft.js';
import { columnProjection } from '../lattice/columnProjection.js';
import { gridSizes } from '../lattice/gridShape.js';

export interface OrderParameterField {
  /** Re phi_i per site, C order over `shape`. */
  phiRe: Float64Array;
  /** Im phi_i per site; omit for a real order parameter (no gauge field). */
  phiIm?: Float64Array;
  /** n_i = <b_i^+ b_i> per site. */
  density: Float64Array;
  /** Lattice shape, 1 to 3 axes, first axis slowest. */
  shape: readonly number[];
}

export interface MomentumStructureOptions {
  /** Lattice axis along which the camera looks (0, 1 or 2); default 2 (perpendicular to a 2D layer). */
  imagingAxis?: 0 | 1 | 2;
  /** Samples per Brillouin zone and axis: a power of two >= the lattice length; default max(64, next power of two). */
  samplesPerZone?: number;
}

export interface MomentumStructureFactor {
  /** sum over layers of |sum_i e^{-i k.r_i} phi_i|^2 at k = 2 pi (p, q) / (M a), index p * M + q. */
  coherentPower: Float64Array;
  /** M: samples per zone and axis. */
  samplesPerZone: number;
  /** sum_i (n_i - |phi_i|^2): the flat incoherent part of B(k). */
  incoherentAtoms: number;
  /** sum_i |phi_i|^2. */
  condensedAtoms: number;
  /** sum_i n_i. */
  atomNumber: number;
  /** Lattice axes that become image axes 0 and 1. */
  keptAxes: [number, number];
}

export function momentumStructureFactor(
  field: OrderParameterField,
  options: MomentumStructureOptions = {},
): MomentumStructureFactor {
  const { shape, phiRe, phiIm, density } = field;
  const n = gridSizes(shape, 'momentumStructureFactor');
  const sites = n[0] * n[1] * n[2];
  if (phiRe.length !== sites || density.length !== sites || (phiIm !== undefined && phiIm.length !== sites)) {
    throw new Error(`momentumStructureFactor: phi and density must each hold ${sites} values for shape [${shape.join(', ')}]`);
  }
  const axis = options.imagingAxis ?? 2;
  if (axis !== 0 && axis !== 1 && axis !== 2) {
    throw new Error(`momentumStructureFactor: imaging axis must be 0, 1 or 2, got ${String(axis)}`);
  }
  const { kept, lu, lv, su, sv, sl, layers } = columnProjection(n, axis);

  const m = options.samplesPerZone ?? nextPowerOfTwo(Math.max(64, lu, lv));
  if (!isPowerOfTwo(m) || m < Math.max(lu, lv)) {
    throw new Error(
      `momentumStructureFactor: samplesPerZone must be a power of two >= the lattice length ${Math.max(lu, lv)}, got ${m}`,
    );
  }

  let atomNumber = 0;
  let condensedAtoms = 0;
  for (let i = 0; i < sites; i++) {
    const re = phiRe[i];
    const im = phiIm === undefined ? 0 : phiIm[i];
    atomNumber += density[i];
    condensedAtoms += re * re + im * im;
  }

  const coherentPower = new Float64Array(m * m);
  const fft = new ComplexFft2d(m, m);
  const data = new Float64Array(2 * m * m);
  // Zero padding: only the first lu rows of the grid hold lattice sites.
  const rowMask = new Uint8Array(m);
  rowMask.fill(1, 0, lu);
  for (let layer = 0; layer < layers; layer++) {
    let any = false;
    for (let u = 0; u < lu && !any; u++) {
      for (let v = 0; v < lv; v++) {
        const s = layer * sl + u * su + v * sv;
        if (phiRe[s] !== 0 || (phiIm !== undefined && phiIm[s] !== 0)) {
          any = true;
          break;
        }
      }
    }
    if (!any) continue; // a layer without coherence (Mott, empty) adds nothing
    data.fill(0);
    for (let u = 0; u < lu; u++) {
      for (let v = 0; v < lv; v++) {
        const s = layer * sl + u * su + v * sv;
        const p = 2 * (u * m + v);
        data[p] = phiRe[s];
        data[p + 1] = phiIm === undefined ? 0 : phiIm[s];
      }
    }
    fft.transform(data, 'forward', rowMask);
    for (let q = 0; q < m * m; q++) {
      const re = data[2 * q];
      const im = data[2 * q + 1];
      coherentPower[q] += re * re + im * im;
    }
  }
  return {
    coherentPower,
    samplesPerZone: m,
    incoherentAtoms: atomNumber - condensedAtoms,
    condensedAtoms,
    atomNumber,
    keptAxes: kept,
  };
}
