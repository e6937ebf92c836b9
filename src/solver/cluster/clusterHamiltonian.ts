// The cluster Hamiltonian of cluster mean-field theory for the Bose-Hubbard model
// (McIntosh, Pisarski, Gooding & Zaremba, arXiv:1111.4102, section II):
//
//   H_C = sum_i [ U_i n_i (n_i - 1)/2 - muLocal_i n_i ]
//         - sum_{<ij> in C} J_ij (b_i^+ b_j + b_j^+ b_i)
//         - sum_i Psi_i (b_i^+ + b_i),            Psi_i = sum_{j outside C} J_ij phi_j,
//
// in the truncated Fock basis of fockBasis.ts; phi real (no gauge fields), so H_C is real
// symmetric. With J_ij >= 0 and Psi_i >= 0 every off-diagonal element is <= 0.
//
// Storage. The sparsity pattern depends only on the geometry and nmax and is built once
// (compressed sparse rows). Each stored entry carries a small code, slot * Q + q, where
// the slot names the bond or the field of a site and q is the integer under the square
// root of the bosonic matrix element (sqrt((n_i + 1) n_j) or sqrt(n_i + 1)); a call
// fills the table coefficients[code] = -J_slot sqrt(q) or -Psi_slot sqrt(q) and the
// diagonal. Per-bond hoppings (disorder, beam envelope) therefore cost nothing extra,
// and the matrix-vector product is a plain gather over rows that allocates nothing.

import type { ClusterGeometry } from './clusterGeometry.js';
import type { FockBasis, NumberSector } from './fockBasis.js';

export interface SparseSymmetricMatrix {
  readonly dim: number;
  readonly rowStart: Int32Array;
  readonly column: Int32Array;
  readonly code: Uint16Array;
  /** coefficient of an entry with code c: coefficients[c] (filled per call) */
  readonly coefficients: Float64Array;
  /** diagonal elements (filled per call) */
  readonly diagonal: Float64Array;
}

export interface ClusterHamiltonian {
  readonly geometry: ClusterGeometry;
  readonly basis: FockBasis;
  /** the number sector the matrix acts in, or null for the full Fock space */
  readonly sector: NumberSector | null;
  /** whether the mean-field terms are present (full space only) */
  readonly withFields: boolean;
  readonly matrix: SparseSymmetricMatrix;
  /** codes per slot: nmax^2 + 1 */
  readonly codesPerSlot: number;
  /** inputs, filled by the caller before updateClusterHamiltonian */
  readonly interactionU: Float64Array;
  readonly muLocal: Float64Array;
  /** J of internal bond b (geometry.bondSiteA[b] - geometry.bondSiteB[b]) */
  readonly bondHopping: Float64Array;
  /** Psi_i; ignored (must stay 0) when withFields is false */
  readonly fieldPsi: Float64Array;
  /** sqrt(q), q = 0 .. nmax^2 */
  readonly sqrtInteger: Float64Array;
  /** per-site on-site energies, site * (nmax + 1) + n (scratch of the update) */
  readonly onsite: Float64Array;
}

/**
 * Sparsity pattern of the cluster Hamiltonian. Without `sector` it acts on the full Fock
 * space and includes the mean-field terms; with a sector it holds the number-conserving
 * part only (hopping and diagonal), in the sector's own indexing.
 */
export function createClusterHamiltonian(geometry: ClusterGeometry, basis: FockBasis, sector: NumberSector | null = null): ClusterHamiltonian {
  const sites = basis.sites;
  const nmax = basis.nmax;
  const Q = nmax * nmax + 1;
  const bonds = geometry.bondCount;
  const withFields = sector === null;
  const slots = bonds + (withFields ? sites : 0);
  if (slots * Q > 65536) throw new Error(`cluster Hamiltonian: ${slots} coupling slots x ${Q} codes do not fit 16-bit codes`);
  const rows = sector === null ? basis.dim : sector.dim;
  const occ = basis.occupation;
  const stride = basis.stride;
  const A = geometry.bondSiteA;
  const B = geometry.bondSiteB;

  // Two passes: count, then fill.
  const rowStart = new Int32Array(rows + 1);
  const visit = (fill: Int32Array | null, column: Int32Array | null, code: Uint16Array | null): number => {
    let k = 0;
    for (let r = 0; r < rows; r++) {
      const s = sector === null ? r : sector.states[r];
      const o = s * sites;
      if (fill !== null) fill[r] = k;
      for (let b = 0; b < bonds; b++) {
        const i = A[b];
        const j = B[b];
        const ni = occ[o + i];
        const nj = occ[o + j];
        // <s| b_i^+ b_j |s - stride_i + stride_j>: needs n_i > 0, n_j < nmax
        if (ni > 0 && nj < nmax) {
          if (column !== null && code !== null) {
            const t = s - stride[i] + stride[j];
            column[k] = sector === null ? t : sector.position[t];
            code[k] = b * Q + ni * (nj + 1);
          }
          k++;
        }
        // <s| b_j^+ b_i |s + stride_i - stride_j>: needs n_j > 0, n_i < nmax
        if (nj > 0 && ni < nmax) {
          if (column !== null && code !== null) {
            const t = s + stride[i] - stride[j];
            column[k] = sector === null ? t : sector.position[t];
            code[k] = b * Q + nj * (ni + 1);
          }
          k++;
        }
      }
      if (withFields) {
        for (let i = 0; i < sites; i++) {
          const ni = occ[o + i];
          const slot = (bonds + i) * Q;
          // <s| b_i^+ |s - stride_i> = sqrt(n_i);  <s| b_i |s + stride_i> = sqrt(n_i + 1)
          if (ni > 0) {
            if (column !== null && code !== null) {
              column[k] = s - stride[i];
              code[k] = slot + ni;
            }
            k++;
          }
          if (ni < nmax) {
            if (column !== null && code !== null) {
              column[k] = s + stride[i];
              code[k] = slot + ni + 1;
            }
            k++;
          }
        }
      }
    }
    if (fill !== null) fill[rows] = k;
    return k;
  };
  const nnz = visit(null, null, null);
  const column = new Int32Array(nnz);
  const code = new Uint16Array(nnz);
  visit(rowStart, column, code);

  const sqrtInteger = new Float64Array(Q);
  for (let q = 0; q < Q; q++) sqrtInteger[q] = Math.sqrt(q);
  return {
    geometry,
    basis,
    sector,
    withFields,
    matrix: {
      dim: rows,
      rowStart,
      column,
      code,
      coefficients: new Float64Array(slots * Q),
      diagonal: new Float64Array(rows),
    },
    codesPerSlot: Q,
    interactionU: new Float64Array(sites),
    muLocal: new Float64Array(sites),
    bondHopping: new Float64Array(bonds),
    fieldPsi: new Float64Array(sites),
    sqrtInteger,
    onsite: new Float64Array(sites * (nmax + 1)),
  };
}

/** Refill the diagonal and the coefficient table from the inputs (U, muLocal, J, Psi). */
export function updateClusterHamiltonian(h: ClusterHamiltonian): void {
  updateClusterCouplings(h);
  updateClusterDiagonal(h);
}

/** Coefficients only: enough when only the fields Psi or hoppings J changed. */
export function updateClusterCouplings(h: ClusterHamiltonian): void {
  const Q = h.codesPerSlot;
  const coef = h.matrix.coefficients;
  const root = h.sqrtInteger;
  const bonds = h.geometry.bondCount;
  for (let b = 0; b < bonds; b++) {
    const j = -h.bondHopping[b];
    const base = b * Q;
    for (let q = 0; q < Q; q++) coef[base + q] = j * root[q];
  }
  if (h.withFields) {
    const sites = h.basis.sites;
    for (let i = 0; i < sites; i++) {
      const p = -h.fieldPsi[i];
      const base = (bonds + i) * Q;
      for (let q = 0; q < Q; q++) coef[base + q] = p * root[q];
    }
  }
}

/** Diagonal U_i n_i (n_i - 1)/2 - muLocal_i n_i summed over sites. */
export function updateClusterDiagonal(h: ClusterHamiltonian): void {
  const basis = h.basis;
  const sites = basis.sites;
  const base = basis.base;
  const onsite = h.onsite;
  for (let i = 0; i < sites; i++) {
    const u = h.interactionU[i];
    const m = h.muLocal[i];
    for (let n = 0; n < base; n++) onsite[i * base + n] = 0.5 * u * n * (n - 1) - m * n;
  }
  const diag = h.matrix.diagonal;
  if (h.sector === null) {
    // Digit expansion from the most significant site down: after handling sites
    // sites-1 .. i, entry m holds the sum over those sites for the leading digits m; each
    // step appends site i as the new least significant digit. O(dim) in total.
    let len = 1;
    diag[0] = 0;
    for (let i = sites - 1; i >= 0; i--) {
      const off = i * base;
      for (let m = len - 1; m >= 0; m--) {
        const v = diag[m];
        const t = m * base;
        for (let n = base - 1; n >= 0; n--) diag[t + n] = v + onsite[off + n];
      }
      len *= base;
    }
  } else {
    const states = h.sector.states;
    const occ = basis.occupation;
    for (let r = 0; r < states.length; r++) {
      const o = states[r] * sites;
      let d = 0;
      for (let i = 0; i < sites; i++) d += onsite[i * base + occ[o + i]];
      diag[r] = d;
    }
  }
}

/** y[yo ..] = (H - shift) x[xo ..]; allocates nothing. */
export function multiplySparse(m: SparseSymmetricMatrix, x: Float64Array, xo: number, y: Float64Array, yo: number, shift = 0): void {
  const dim = m.dim;
  const rowStart = m.rowStart;
  const column = m.column;
  const code = m.code;
  const coef = m.coefficients;
  const diag = m.diagonal;
  let k = rowStart[0];
  for (let r = 0; r < dim; r++) {
    const end = rowStart[r + 1];
    let acc = (diag[r] - shift) * x[xo + r];
    for (; k < end; k++) acc += coef[code[k]] * x[xo + column[k]];
    y[yo + r] = acc;
  }
}

/** Dense copy of the matrix (row-major dim x dim) into `out`. */
export function denseFromSparse(m: SparseSymmetricMatrix, out: Float64Array): void {
  const dim = m.dim;
  out.fill(0, 0, dim * dim);
  for (let r = 0; r < dim; r++) {
    out[r * dim + r] = m.diagonal[r];
    for (let k = m.rowStart[r]; k < m.rowStart[r + 1]; k++) out[r * dim + m.column[k]] += m.coefficients[m.code[k]];
  }
}

/** Bound on the spectral radius of H (Gershgorin): a scale for tolerances. */
export function gershgorinRadius(m: SparseSymmetricMatrix): number {
  let best = 0;
  for (let r = 0; r < m.dim; r++) {
    let s = Math.abs(m.diagonal[r]);
    for (let k = m.rowStart[r]; k < m.rowStart[r + 1]; k++) s += Math.abs(m.coefficients[m.code[k]]);
    if (s > best) best = s;
  }
  return best;
}
