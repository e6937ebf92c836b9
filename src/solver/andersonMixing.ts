// Anderson mixing of a fixed-point iteration x -> G(x) over whole sweeps (Anderson,
// J. ACM 12, 547 (1965); in the form of Walker & Ni, SIAM J. Numer. Anal. 49, 1715 (2011)).
//
// With the residual f = G(x) - x and the differences dF_j, dG_j of the last `depth`
// residuals and outputs, the next input is
//   x_next = G(x_k) - sum_j gamma_j dG_j,   gamma = argmin || f_k - sum_j gamma_j dF_j ||_2,
// i.e. the output the secant model of the recent sweeps says has the smallest residual. On a
// linear map without truncation this is GMRES on (1 - A) x = b (Walker & Ni), so one slow
// mode is removed within a few sweeps, however close its rate is to 1.
//
// Which values carry the iteration: a red-black sweep recomputes the first colour from the
// second, so the output depends on the second colour alone and the iteration is a map of
// those values; mixing only them is that map's Anderson step and halves the memory. An
// executor that does not promise this (the cluster driver) mixes every site.
//
// Determinism: every sum runs over the carrying sites in one fixed order on the calling
// thread, so the step is the same for any thread count. Memory: 2 (depth + 1) doubles per
// carrying site, contiguous per site.

export interface AndersonMixer {
  /** Number of difference columns held (0 after a restart). */
  readonly columns: number;
  /**
   * Record the sweep just done: `output` holds G(x_k), `residual` holds G(x_k) - x_k. Returns
   * the contraction of G along the last step, max|G(x_k) - G(x_k-1)| / max|x_k - x_k-1| over
   * the carrying sites (NaN at the first sweep).
   */
  record(output: Float64Array, residual: Float64Array): number;
  /**
   * Overwrite the carrying sites of `output` (which must still hold G(x_k)) with the mixed next
   * input, floored at `floorFraction` G(x_k) (null: no floor) so that phi keeps its sign and no
   * region is set exactly to zero. Returns false (output untouched) when there is no usable
   * history.
   */
  mix(output: Float64Array, floorFraction: number | null): boolean;
  /** Forget the difference columns (the next step is a plain sweep). */
  restart(): void;
}

/** A Cholesky pivot below this fraction of its column's squared norm drops that column and older ones. */
const DEPENDENT_COLUMN = 1e-10;
/** A step with sum |gamma_j| above this is not trusted (restart instead). */
const MAX_COEFFICIENTS = 1e6;
/** Most difference columns (the hot loops keep them in registers). */
export const MAX_ANDERSON_DEPTH = 4;

/**
 * Mixer over the sites `sites` (indices into the field arrays) or, when null, over all
 * `siteCount` sites. `depth` (1 to MAX_ANDERSON_DEPTH) difference columns are kept, the
 * oldest overwritten.
 */
export function createAndersonMixer(sites: Int32Array | null, siteCount: number, depth: number): AndersonMixer {
  if (!(Number.isInteger(depth) && depth >= 1 && depth <= MAX_ANDERSON_DEPTH)) {
    throw new Error(`Anderson depth must be an integer from 1 to ${MAX_ANDERSON_DEPTH}, got ${depth}`);
  }
  const count = sites === null ? siteCount : sites.length;
  // Per carrying site, contiguous: f_k, G(x_k), then dF by ring slot, then dG by ring slot.
  const stride = 2 + 2 * depth;
  const store = new Float64Array(count * stride);
  // gram[a][b] = dF_a . dF_b and rhs[a] = dF_a . f_k, by ring slot.
  const gram = Array.from({ length: depth }, () => new Float64Array(depth));
  const rhs = new Float64Array(depth);
  const chol = Array.from({ length: depth }, () => new Float64Array(depth));
  const gamma = new Float64Array(depth);
  const order = new Int32Array(depth); // ring slots, newest first
  const sums = new Float64Array(10);
  let columns = 0;
  let newest = -1;
  let started = false;

  const record = (output: Float64Array, residual: Float64Array): number => {
    if (!started) {
      for (let k = 0; k < count; k++) {
        const i = sites === null ? k : sites[k];
        store[k * stride] = residual[i];
        store[k * stride + 1] = output[i];
      }
      started = true;
      return NaN;
    }
    const slot = (newest + 1) % depth;
    const older = Math.min(columns, depth - 1); // columns kept besides the new one
    order[0] = slot;
    for (let j = 1; j <= older; j++) order[j] = (slot - j + depth) % depth;
    // Offsets of the new dF, dG and of the older dF columns (unused ones point at the new one, weight 0).
    const fNew = 2 + slot;
    const gNew = 2 + depth + slot;
    const o1 = 2 + (older >= 1 ? order[1] : slot);
    const o2 = 2 + (older >= 2 ? order[2] : slot);
    const o3 = 2 + (older >= 3 ? order[3] : slot);
    recordSweep(store, stride, count, sites, output, residual, fNew, gNew, o1, o2, o3, sums);
    const [selfDot, rhsNew, d1, d2, d3, r1, r2, r3, maxDG, maxDX] = sums;
    gram[slot][slot] = selfDot;
    rhs[slot] = rhsNew;
    const dotsOld = [d1, d2, d3];
    const rhsOld = [r1, r2, r3];
    for (let j = 1; j <= older; j++) {
      gram[slot][order[j]] = dotsOld[j - 1];
      gram[order[j]][slot] = dotsOld[j - 1];
      rhs[order[j]] = rhsOld[j - 1];
    }
    newest = slot;
    columns = older + 1;
    return maxDX > 0 ? maxDG / maxDX : 0;
  };

  /** Solve the normal equations (newest column first); older columns that are nearly dependent are dropped. */
  const solveCoefficients = (): number => {
    let used = columns;
    for (let a = 0; a < used; a++) {
      const sa = order[a];
      for (let b = 0; b <= a; b++) {
        let s = gram[sa][order[b]];
        for (let c = 0; c < b; c++) s -= chol[a][c] * chol[b][c];
        if (a === b) {
          if (!(s > DEPENDENT_COLUMN * gram[sa][sa])) {
            used = a;
            break;
          }
          chol[a][a] = Math.sqrt(s);
        } else {
          chol[a][b] = s / chol[b][b];
        }
      }
    }
    columns = used;
    if (used === 0) return 0;
    for (let a = 0; a < used; a++) {
      let s = rhs[order[a]];
      for (let c = 0; c < a; c++) s -= chol[a][c] * gamma[c];
      gamma[a] = s / chol[a][a];
    }
    for (let a = used - 1; a >= 0; a--) {
      let s = gamma[a];
      for (let c = a + 1; c < used; c++) s -= chol[c][a] * gamma[c];
      gamma[a] = s / chol[a][a];
    }
    return used;
  };

  const mix = (output: Float64Array, floorFraction: number | null): boolean => {
    if (columns === 0) return false;
    const used = solveCoefficients();
    if (used === 0) return false;
    let total = 0;
    for (let a = 0; a < used; a++) total += Math.abs(gamma[a]);
    if (!(total <= MAX_COEFFICIENTS)) {
      columns = 0;
      return false;
    }
    // x_next = G(x_k) - sum_a gamma_a dG_a; unused columns get weight 0.
    const q0 = 2 + depth + order[0];
    const q1 = 2 + depth + order[used >= 2 ? 1 : 0];
    const q2 = 2 + depth + order[used >= 3 ? 2 : 0];
    const q3 = 2 + depth + order[used >= 4 ? 3 : 0];
    const w0 = gamma[0];
    const w1 = used >= 2 ? gamma[1] : 0;
    const w2 = used >= 3 ? gamma[2] : 0;
    const w3 = used >= 4 ? gamma[3] : 0;
    writeMix(store, stride, count, sites, output, floorFraction !== null, floorFraction ?? 0, q0, q1, q2, q3, w0, w1, w2, w3);
    return true;
  };

  return {
    get columns() {
      return columns;
    },
    record,
    mix,
    restart: () => {
      columns = 0;
    },
  };
}

// The two passes over the sites, kept apart from the bookkeeping so that the engine compiles
// them once as small loops.

/**
 * Store the new residual and output and their differences (at offsets fNew, gNew) for every
 * carrying site; sums = [dF.dF, dF.f, dF_o1.dF, dF_o2.dF, dF_o3.dF, dF_o1.f, dF_o2.f, dF_o3.f,
 * max|dG|, max|dX|] with dF, dG the new differences and dF_o the older columns at offsets o1-o3.
 */
function recordSweep(
  store: Float64Array,
  stride: number,
  count: number,
  sites: Int32Array | null,
  output: Float64Array,
  residual: Float64Array,
  fNew: number,
  gNew: number,
  o1: number,
  o2: number,
  o3: number,
  sums: Float64Array,
): void {
  let selfDot = 0;
  let rhsNew = 0;
  let d1 = 0;
  let d2 = 0;
  let d3 = 0;
  let r1 = 0;
  let r2 = 0;
  let r3 = 0;
  let maxDG = 0;
  let maxDX = 0;
  for (let k = 0, base = 0; k < count; k++, base += stride) {
    const i = sites === null ? k : sites[k];
    const f = residual[i];
    const g = output[i];
    const df = f - store[base];
    const dg = g - store[base + 1];
    store[base] = f;
    store[base + 1] = g;
    store[base + fNew] = df;
    store[base + gNew] = dg;
    selfDot += df * df;
    rhsNew += df * f;
    const v1 = store[base + o1];
    const v2 = store[base + o2];
    const v3 = store[base + o3];
    d1 += v1 * df;
    r1 += v1 * f;
    d2 += v2 * df;
    r2 += v2 * f;
    d3 += v3 * df;
    r3 += v3 * f;
    const dx = dg - df; // x_k - x_{k-1}
    const adg = dg < 0 ? -dg : dg;
    const adx = dx < 0 ? -dx : dx;
    if (adg > maxDG) maxDG = adg;
    if (adx > maxDX) maxDX = adx;
  }
  sums[0] = selfDot;
  sums[1] = rhsNew;
  sums[2] = d1;
  sums[3] = d2;
  sums[4] = d3;
  sums[5] = r1;
  sums[6] = r2;
  sums[7] = r3;
  sums[8] = maxDG;
  sums[9] = maxDX;
}

/** output_i = G_i - sum_a w_a dG_a,i, at least floorFraction G_i when floored, over the carrying sites (dG_a at offsets q_a). */
function writeMix(
  store: Float64Array,
  stride: number,
  count: number,
  sites: Int32Array | null,
  output: Float64Array,
  floored: boolean,
  floorFraction: number,
  q0: number,
  q1: number,
  q2: number,
  q3: number,
  w0: number,
  w1: number,
  w2: number,
  w3: number,
): void {
  for (let k = 0, base = 0; k < count; k++, base += stride) {
    const i = sites === null ? k : sites[k];
    const current = store[base + 1];
    const next = current - w0 * store[base + q0] - w1 * store[base + q1] - w2 * store[base + q2] - w3 * store[base + q3];
    const floor = floorFraction * current;
    output[i] = floored && !(next > floor) ? floor : next;
  }
}

/**
 * Indices of the sites of colour 1 ((x + y + z) odd in the internal [n0, n1, n2] layout),
 * in storage order: the values a red-black sweep (colour 0 first) depends on.
 */
export function lastColourSites(inner: readonly [number, number, number]): Int32Array {
  const [n0, n1, n2] = inner;
  const total = n0 * n1 * n2;
  const out = new Int32Array(Math.floor(total / 2) + 1);
  let k = 0;
  for (let a = 0; a < n0; a++) {
    for (let b = 0; b < n1; b++) {
      const base = (a * n1 + b) * n2;
      for (let c = (a + b + 1) & 1; c < n2; c += 2) out[k++] = base + c;
    }
  }
  return out.slice(0, k);
}
