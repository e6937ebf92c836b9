// Implicit QL with Wilkinson shifts on a symmetric tridiagonal matrix (Bowdler, Martin,
// Reinsch & Wilkinson, Numer. Math. 11, 293 (1968): the tql2 procedure, and without
// accumulated rotations tql1).

/**
 * Diagonal d[0..n-1], off-diagonal e[i] between i and i+1 (e[n-1] = 0). On return d holds
 * the eigenvalues (unsorted). With z (n x n, identity on entry) the rotations are
 * accumulated so that column j of z is eigenvector j. Returns false if an eigenvalue needed
 * more than 60 iterations.
 */
export function implicitQl(d: Float64Array, e: Float64Array, n: number, z: Float64Array | null): boolean {
  const eps = 2.220446049250313e-16;
  let f = 0;
  let tst1 = 0;
  for (let l = 0; l < n; l++) {
    const t = Math.abs(d[l]) + Math.abs(e[l]);
    if (t > tst1) tst1 = t;
    let m = l;
    while (m < n - 1 && Math.abs(e[m]) > eps * tst1) m++;
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) return false;
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.sqrt(p * p + 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let sn = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = sn;
          g = c * e[i];
          h = c * p;
          r = Math.sqrt(p * p + e[i] * e[i]);
          e[i + 1] = sn * r;
          sn = e[i] / r;
          c = p / r;
          p = c * d[i] - sn * g;
          d[i + 1] = h + sn * (c * g + sn * d[i]);
          if (z !== null) {
            // accumulate the rotation on rows k, columns i and i+1
            for (let k = 0; k < n; k++) {
              const zk = k * n;
              h = z[zk + i + 1];
              z[zk + i + 1] = sn * z[zk + i] + c * h;
              z[zk + i] = c * z[zk + i] - sn * h;
            }
          }
        }
        p = (-sn * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = sn * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] += f;
    e[l] = 0;
  }
  return true;
}
