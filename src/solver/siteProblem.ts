// The single-site Gutzwiller problem of the Bose-Hubbard model (DESIGN.md section 1):
//
//   H = sum_n [ U n(n-1)/2 - muLocal n ] |n><n|  -  psi (b^+ + b),     n = 0 .. nmax,
//
// with muLocal = mu - eps_i and psi = sum_j J_ij phi_j the mean field of the neighbours
// (real, >= 0 without gauge fields). In the occupation basis H is real symmetric
// tridiagonal: diagonal a_n = U n(n-1)/2 - muLocal n, off-diagonal e_n = -psi sqrt(n+1).
//
// Ground state (T = 0)
//   The lowest eigenvalue is found with Laguerre's method on det(H - lambda), evaluated
//   through the LDL^T pivots d_k(lambda) (Sturm sequence in ratio form, no overflow):
//   for a polynomial with only real zeros, Laguerre started left of the smallest zero
//   converges monotonically and cubically to it (Wilkinson, The Algebraic Eigenvalue
//   Problem, 1965, section 7.10; Parlett, The Symmetric Eigenvalue Problem, 1998).
//   A start that is guaranteed to lie below the smallest eigenvalue comes from
//   Gershgorin's theorem or, in a sweep, from Weyl's inequality applied to the previous
//   solution of the same site (see `weylLowerBound`).
//   The eigenvector comes from a twisted factorisation (Dhillon & Parlett, Linear Algebra
//   Appl. 387, 1 (2004)): top-down and bottom-up pivots, the twist index r where
//   |gamma_r| is smallest (the largest component), then outward recurrences that only
//   ever run toward decaying components. With psi > 0 all off-diagonals are negative, so
//   every component of the ground state is positive (Perron-Frobenius) and no
//   cancellation occurs.
//
// Thermal state (T > 0)
//   Full eigendecomposition by the implicit QL algorithm with Wilkinson shifts on the
//   tridiagonal matrix with accumulated rotations (Bowdler, Martin, Reinsch & Wilkinson,
//   Numer. Math. 11, 293 (1968), the tql2 procedure), then Boltzmann averages.
//
// Everything works on a preallocated workspace: no allocation per call.

export interface SiteWorkspace {
  /** nmax + 1 */
  readonly states: number;
  readonly nmax: number;
  /** sqrt(n + 1), n = 0..nmax-1 (bosonic matrix elements) */
  readonly sqrtUp: Float64Array;
  readonly diag: Float64Array;
  /** squared off-diagonals e_n^2 */
  readonly offSq: Float64Array;
  readonly pivotsTop: Float64Array;
  readonly pivotsBottom: Float64Array;
  /** ground-state amplitudes c_n (normalised) after solveSiteGround */
  readonly amplitudes: Float64Array;
  /** thermal case: eigenvalues and eigenvectors (row k = eigenvector k) */
  readonly eigenvalues: Float64Array;
  readonly eigenvectors: Float64Array;
  readonly qlOff: Float64Array;
  /** thermal case: populations p_n = <n|rho|n> */
  readonly populations: Float64Array;
}

export function createSiteWorkspace(nmax: number): SiteWorkspace {
  if (!Number.isInteger(nmax) || nmax < 1) throw new Error(`nmax: expected an integer >= 1, got ${nmax}`);
  const states = nmax + 1;
  const sqrtUp = new Float64Array(states);
  for (let n = 0; n < states; n++) sqrtUp[n] = Math.sqrt(n + 1);
  return {
    states,
    nmax,
    sqrtUp,
    diag: new Float64Array(states),
    offSq: new Float64Array(states),
    pivotsTop: new Float64Array(states),
    pivotsBottom: new Float64Array(states),
    amplitudes: new Float64Array(states),
    eigenvalues: new Float64Array(states),
    eigenvectors: new Float64Array(states * states),
    qlOff: new Float64Array(states),
    populations: new Float64Array(states),
  };
}

/** Observables of one site; filled in place by the solvers below. */
export interface SiteObservables {
  /** ground-state energy (T = 0) or -kT ln Z (T > 0) of the single-site Hamiltonian */
  energy: number;
  /** <b> */
  phi: number;
  /** <n> */
  density: number;
  /** <n^2> */
  densitySq: number;
  /** probability of an odd occupation, sum over odd n of p_n */
  parityOdd: number;
  /** weight on the truncation state |nmax> */
  topWeight: number;
  /** von Neumann entropy of the site state in units of k_B (0 at T = 0) */
  entropy: number;
}

export function createSiteObservables(): SiteObservables {
  return { energy: 0, phi: 0, density: 0, densitySq: 0, parityOdd: 0, topWeight: 0, entropy: 0 };
}

const TINY_PIVOT = 1e-300;

function fillDiagonal(ws: SiteWorkspace, interactionU: number, muLocal: number, psi: number): void {
  const { diag, offSq, sqrtUp, states } = ws;
  const psiSq = psi * psi;
  for (let n = 0; n < states; n++) {
    diag[n] = 0.5 * interactionU * n * (n - 1) - muLocal * n;
    offSq[n] = psiSq * (n + 1); // e_n^2 = psi^2 (n+1); the last entry is unused
  }
  void sqrtUp;
}

/**
 * Norm of the truncated b + b^+ (largest eigenvalue of the truncated position operator of
 * a harmonic oscillator, bounded by 2 sqrt(nmax)). Used in Weyl's bound below.
 */
export function couplingNormBound(nmax: number): number {
  return 2 * Math.sqrt(nmax);
}

/**
 * A value guaranteed to lie below the ground energy of the site Hamiltonian at
 * (muLocal, psi), given its ground energy `previousEnergy` at (muLocalPrev, psiPrev):
 * by Weyl's inequality lambda_min(A + E) >= lambda_min(A) - ||E||_2, with
 * ||E|| <= |psi - psiPrev| ||b + b^+|| + |muLocal - muLocalPrev| nmax.
 */
export function weylLowerBound(
  previousEnergy: number,
  psi: number,
  psiPrev: number,
  muLocal: number,
  muLocalPrev: number,
  nmax: number,
): number {
  const shift = Math.abs(psi - psiPrev) * couplingNormBound(nmax) + Math.abs(muLocal - muLocalPrev) * nmax;
  // Relative slack covers rounding in the previous solve.
  return previousEnergy - shift - 1e-12 * (Math.abs(previousEnergy) + 1) - 1e-300;
}

/**
 * Lowest eigenpair of the site Hamiltonian. Returns phi = <b>; the normalised amplitudes
 * are left in ws.amplitudes and the eigenvalue in the return of `siteGroundEnergy`.
 * `lowerBound` must lie below the ground energy (pass NaN to use Gershgorin's bound).
 * The ground energy is written to ws.eigenvalues[0].
 */
export function solveSiteGround(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  lowerBound: number,
): number {
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const amp = ws.amplitudes;
  fillDiagonal(ws, interactionU, muLocal, psi);

  if (psi === 0) {
    // Diagonal: the ground state is the lowest diagonal entry (lowest n on a tie).
    let best = 0;
    for (let n = 1; n < states; n++) if (diag[n] < diag[best]) best = n;
    amp.fill(0);
    amp[best] = 1;
    ws.eigenvalues[0] = diag[best];
    return 0;
  }

  // Starting point below the spectrum.
  let lambda = lowerBound;
  if (!(lambda === lambda)) {
    const absPsi = Math.abs(psi);
    lambda = Infinity;
    for (let n = 0; n < states; n++) {
      const radius = absPsi * ((n > 0 ? ws.sqrtUp[n - 1] : 0) + (n < states - 1 ? ws.sqrtUp[n] : 0));
      const g = diag[n] - radius;
      if (g < lambda) lambda = g;
    }
    lambda -= 1e-12 * (Math.abs(lambda) + 1);
  }

  // Laguerre iteration on p(lambda) = det(H - lambda) through the pivots:
  //   d_k = a_k - lambda - e_{k-1}^2 / d_{k-1}
  //   d_k' = -1 + e_{k-1}^2 d_{k-1}' / d_{k-1}^2
  //   d_k'' = e_{k-1}^2 (d_{k-1}'' / d_{k-1}^2 - 2 d_{k-1}'^2 / d_{k-1}^3)
  //   G = p'/p = sum d_k'/d_k,  H = G^2 - p''/p = sum (d_k'/d_k)^2 - d_k''/d_k
  const degree = states;
  for (let iter = 0; iter < 100; iter++) {
    let d = diag[0] - lambda;
    if (d <= 0) break; // at or above the smallest eigenvalue: converged to rounding
    let dp = -1;
    let dpp = 0;
    let g = dp / d;
    let h = g * g;
    let positive = true;
    for (let k = 1; k < states; k++) {
      const inv = 1 / d;
      const e2 = offSq[k - 1];
      const t = e2 * inv;
      const dNew = diag[k] - lambda - t;
      const dpNew = -1 + t * dp * inv;
      const dppNew = t * inv * (dpp - 2 * dp * dp * inv);
      d = dNew;
      dp = dpNew;
      dpp = dppNew;
      if (d <= 0) {
        positive = false;
        break;
      }
      const r = dp / d;
      g += r;
      h += r * r - dpp / d;
    }
    if (!positive) break;
    // Laguerre step: lambda_new = lambda - n / (G -/+ sqrt((n-1)(n H - G^2))), with the
    // sign that maximises the denominator. G < 0 left of all zeros, so step > 0.
    const disc = (degree - 1) * (degree * h - g * g);
    const denom = g - Math.sqrt(disc > 0 ? disc : 0);
    const step = -degree / denom;
    lambda += step;
    if (!(step > 4e-16 * (Math.abs(lambda) + Math.abs(interactionU) + psi))) break;
  }

  twistedGroundVector(ws, lambda);
  ws.eigenvalues[0] = lambda;
  let phi = 0;
  for (let n = 0; n < states - 1; n++) phi += ws.sqrtUp[n] * amp[n] * amp[n + 1];
  return phi;
}

/**
 * Eigenvector of the tridiagonal matrix in ws (diag, offSq, off-diagonals negative) for the
 * eigenvalue lambda, by a twisted factorisation; written to ws.amplitudes, normalised,
 * all components >= 0.
 */
function twistedGroundVector(ws: SiteWorkspace, lambda: number): void {
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const top = ws.pivotsTop;
  const bottom = ws.pivotsBottom;
  const amp = ws.amplitudes;
  const sqrtUp = ws.sqrtUp;

  let d = diag[0] - lambda;
  if (d === 0) d = TINY_PIVOT;
  top[0] = d;
  for (let k = 1; k < states; k++) {
    d = diag[k] - lambda - offSq[k - 1] / d;
    if (d === 0) d = TINY_PIVOT;
    top[k] = d;
  }
  d = diag[states - 1] - lambda;
  if (d === 0) d = TINY_PIVOT;
  bottom[states - 1] = d;
  for (let k = states - 2; k >= 0; k--) {
    d = diag[k] - lambda - offSq[k] / d;
    if (d === 0) d = TINY_PIVOT;
    bottom[k] = d;
  }
  // gamma_k = top_k + bottom_k - (a_k - lambda); pick the smallest |gamma|.
  let twist = 0;
  let best = Infinity;
  for (let k = 0; k < states; k++) {
    const gamma = Math.abs(top[k] + bottom[k] - (diag[k] - lambda));
    if (gamma < best) {
      best = gamma;
      twist = k;
    }
  }
  // Off-diagonal e_k = -psi sqrt(k+1) < 0, so x_k = -e_k/top_k x_{k+1} = |e_k|/top_k x_{k+1}.
  // |e_k| = sqrt(offSq[k]); written through sqrtUp to avoid a square root per entry.
  const psi = Math.sqrt(offSq[0]);
  amp[twist] = 1;
  let norm = 1;
  for (let k = twist - 1; k >= 0; k--) {
    const x = ((psi * sqrtUp[k]) / top[k]) * amp[k + 1];
    amp[k] = x;
    norm += x * x;
  }
  for (let k = twist + 1; k < states; k++) {
    const x = ((psi * sqrtUp[k - 1]) / bottom[k]) * amp[k - 1];
    amp[k] = x;
    norm += x * x;
  }
  const scale = 1 / Math.sqrt(norm);
  for (let k = 0; k < states; k++) amp[k] *= scale;
}

/** Fill `out` from the ground-state amplitudes left by solveSiteGround. */
export function groundObservables(ws: SiteWorkspace, phi: number, out: SiteObservables): void {
  const amp = ws.amplitudes;
  let density = 0;
  let densitySq = 0;
  let odd = 0;
  for (let n = 0; n < ws.states; n++) {
    const p = amp[n] * amp[n];
    density += n * p;
    densitySq += n * n * p;
    if (n & 1) odd += p;
  }
  out.energy = ws.eigenvalues[0];
  out.phi = phi;
  out.density = density;
  out.densitySq = densitySq;
  out.parityOdd = odd;
  out.topWeight = amp[ws.states - 1] * amp[ws.states - 1];
  out.entropy = 0;
}

/**
 * Full spectrum of the site Hamiltonian by implicit QL with Wilkinson shifts (tql2).
 * Eigenvalues ascending in ws.eigenvalues, eigenvector k in row k of ws.eigenvectors.
 */
export function diagonalizeSite(ws: SiteWorkspace, interactionU: number, muLocal: number, psi: number): void {
  const n = ws.states;
  fillDiagonal(ws, interactionU, muLocal, psi);
  const d = ws.eigenvalues;
  const e = ws.qlOff;
  const z = ws.eigenvectors; // z[k*n + i]: component i of eigenvector k
  for (let i = 0; i < n; i++) {
    d[i] = ws.diag[i];
    e[i] = i < n - 1 ? -psi * ws.sqrtUp[i] : 0;
  }
  z.fill(0);
  for (let i = 0; i < n; i++) z[i * n + i] = 1;
  if (psi === 0) {
    sortEigen(ws);
    return;
  }

  let f = 0;
  let tst1 = 0;
  const eps = 2.220446049250313e-16;
  for (let l = 0; l < n; l++) {
    const t = Math.abs(d[l]) + Math.abs(e[l]);
    if (t > tst1) tst1 = t;
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= eps * tst1) break;
      m++;
    }
    if (m === n) m = n - 1;
    if (m > l) {
      let iter = 0;
      do {
        iter++;
        if (iter > 60) break;
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.hypot(p, 1);
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
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = Math.hypot(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          // accumulate the rotation on eigenvector components i and i+1
          for (let k = 0; k < n; k++) {
            const zk = k * n;
            h = z[zk + i + 1];
            z[zk + i + 1] = s * z[zk + i] + c * h;
            z[zk + i] = c * z[zk + i] - s * h;
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }
  // tql2 stores eigenvector j as column j (z[k*n + j] = component k). Transpose so that
  // row j holds eigenvector j, then sort.
  for (let a = 0; a < n; a++) {
    for (let b = a + 1; b < n; b++) {
      const t = z[a * n + b];
      z[a * n + b] = z[b * n + a];
      z[b * n + a] = t;
    }
  }
  sortEigen(ws);
}

function sortEigen(ws: SiteWorkspace): void {
  const n = ws.states;
  const d = ws.eigenvalues;
  const z = ws.eigenvectors;
  // selection sort: n is tiny
  for (let i = 0; i < n - 1; i++) {
    let k = i;
    let p = d[i];
    for (let j = i + 1; j < n; j++) {
      if (d[j] < p) {
        k = j;
        p = d[j];
      }
    }
    if (k !== i) {
      d[k] = d[i];
      d[i] = p;
      for (let c = 0; c < n; c++) {
        const t = z[i * n + c];
        z[i * n + c] = z[k * n + c];
        z[k * n + c] = t;
      }
    }
  }
}

/**
 * Thermal state rho = exp(-H/kT)/Z of the site problem. Returns phi = Tr(rho b) and fills
 * `out` (energy = -kT ln Z, the site grand potential) when `out` is given.
 */
export function solveSiteThermal(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  temperature: number,
  out: SiteObservables | null,
): number {
  diagonalizeSite(ws, interactionU, muLocal, psi);
  const n = ws.states;
  const d = ws.eigenvalues;
  const z = ws.eigenvectors;
  const sqrtUp = ws.sqrtUp;
  const pop = ws.populations;
  const beta = 1 / temperature;
  const e0 = d[0];
  let partition = 0;
  let meanExcess = 0;
  let phi = 0;
  pop.fill(0);
  for (let k = 0; k < n; k++) {
    const x = (d[k] - e0) * beta;
    if (x > 745) break; // exp underflows; eigenvalues are sorted
    const w = Math.exp(-x);
    partition += w;
    meanExcess += w * x;
    const row = k * n;
    let bk = 0;
    for (let i = 0; i < n - 1; i++) bk += sqrtUp[i] * z[row + i] * z[row + i + 1];
    phi += w * bk;
    if (out) for (let i = 0; i < n; i++) pop[i] += w * z[row + i] * z[row + i];
  }
  const invZ = 1 / partition;
  phi *= invZ;
  if (out) {
    let density = 0;
    let densitySq = 0;
    let odd = 0;
    for (let i = 0; i < n; i++) {
      const p = pop[i] * invZ;
      pop[i] = p;
      density += i * p;
      densitySq += i * i * p;
      if (i & 1) odd += p;
    }
    out.energy = e0 - temperature * Math.log(partition);
    out.phi = phi;
    out.density = density;
    out.densitySq = densitySq;
    out.parityOdd = odd;
    out.topWeight = pop[n - 1];
    out.entropy = Math.log(partition) + meanExcess * invZ;
  }
  return phi;
}

/**
 * One call for either regime: T = 0 (temperature <= 0) uses the ground state with the
 * given lower bound; T > 0 the thermal state. Fills `out`, returns phi.
 */
export function solveSite(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  temperature: number,
  out: SiteObservables,
  lowerBound = NaN,
): number {
  if (temperature > 0) return solveSiteThermal(ws, interactionU, muLocal, psi, temperature, out);
  const phi = solveSiteGround(ws, interactionU, muLocal, psi, lowerBound);
  groundObservables(ws, phi, out);
  return phi;
}
