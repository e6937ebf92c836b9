// Geometry of a hypercubic lattice (1D chain, 2D square, 3D simple cubic) stored as a flat
// C-order array: index = (x * ny + y) * nz + z, first axis slowest (DESIGN.md section 6).
//
// Internally every lattice is three-dimensional with the missing axes of length 1 put in
// FRONT: a 2D lattice [nx, ny] is [1, nx, ny] and a chain [nx] is [1, 1, nx]. The flat
// index is unchanged, and the innermost (contiguous) loop always runs along the longest
// physical axis the user named last, which keeps the sweep kernel's inner loop long.

export interface LatticeGeometry {
  /** physical shape as given, e.g. [64, 64] */
  readonly shape: readonly number[];
  /** 1, 2 or 3 */
  readonly dims: number;
  /** periodic boundary per physical axis */
  readonly periodic: readonly boolean[];
  /** internal shape [n0, n1, n2] with leading 1s */
  readonly inner: readonly [number, number, number];
  /** periodic flag per internal axis */
  readonly innerPeriodic: readonly [boolean, boolean, boolean];
  readonly siteCount: number;
  /** rows of the internal layout: n0 * n1; each row is a contiguous run of n2 sites */
  readonly rowCount: number;
  /** coordination number of a bulk site */
  readonly coordination: number;
}

export function createLatticeGeometry(shape: readonly number[], periodic: readonly boolean[]): LatticeGeometry {
  const dims = shape.length;
  if (dims < 1 || dims > 3) throw new Error(`lattice shape: expected 1 to 3 axes, got ${dims}`);
  if (periodic.length !== dims) throw new Error(`lattice boundaries: expected ${dims} entries, got ${periodic.length}`);
  shape.forEach((n, d) => {
    if (!Number.isInteger(n) || n < 1) throw new Error(`lattice shape[${d}]: expected an integer >= 1, got ${n}`);
    if (periodic[d] && (n < 2 || n % 2 !== 0)) {
      throw new Error(
        `lattice shape[${d}]: a periodic axis needs an even length >= 2 for the red-black update, got ${n}; ` +
          `make it even or make that boundary open`,
      );
    }
  });
  const pad = 3 - dims;
  const inner = [1, 1, 1] as [number, number, number];
  const innerPeriodic = [false, false, false] as [boolean, boolean, boolean];
  for (let d = 0; d < dims; d++) {
    inner[pad + d] = shape[d];
    innerPeriodic[pad + d] = periodic[d];
  }
  const siteCount = inner[0] * inner[1] * inner[2];
  let coordination = 0;
  for (const n of shape) if (n > 1) coordination += 2;
  return {
    shape: [...shape],
    dims,
    periodic: [...periodic],
    inner,
    innerPeriodic,
    siteCount,
    rowCount: inner[0] * inner[1],
    coordination,
  };
}

/** Internal axis (0..2) of a physical axis. */
export function innerAxis(geometry: LatticeGeometry, physicalAxis: number): number {
  return 3 - geometry.dims + physicalAxis;
}

/** Physical coordinates of a flat site index, written into `out`. */
export function siteCoordinates(geometry: LatticeGeometry, index: number, out: number[]): number[] {
  const [, n1, n2] = geometry.inner;
  const c2 = index % n2;
  const r = (index - c2) / n2;
  const c1 = r % n1;
  const c0 = (r - c1) / n1;
  const all = [c0, c1, c2];
  const pad = 3 - geometry.dims;
  for (let d = 0; d < geometry.dims; d++) out[d] = all[pad + d];
  out.length = geometry.dims;
  return out;
}

/**
 * One value per site, in flat C order, from valueAt(q) with q = [a, b, c] the internal
 * coordinates of the site (leading axes of length 1 for a chain or a plane). For the
 * landscape terms that are not a sum of one table per axis (box walls, a projected image):
 * they read their coordinates from q instead of each writing the triple loop. q is one
 * buffer reused for every site: read it, do not keep it.
 */
export function mapSites(geometry: LatticeGeometry, valueAt: (q: Int32Array) => number): Float64Array {
  const [n0, n1, n2] = geometry.inner;
  const q = new Int32Array(3);
  const out = new Float64Array(geometry.siteCount);
  let i = 0;
  for (let a = 0; a < n0; a++) {
    q[0] = a;
    for (let b = 0; b < n1; b++) {
      q[1] = b;
      for (let c = 0; c < n2; c++) {
        q[2] = c;
        out[i++] = valueAt(q);
      }
    }
  }
  return out;
}
