// Site-resolved J, on-site energies and int |w|^4 of a lattice with a second standing wave
// (src/physics/combinedLatticeWannier.ts: finite differences, projected-position Wannier
// functions, Richardson extrapolation), checked against calculations built independently here:
// - no second lattice: the plane-wave band structure and Wannier function of bandStructure.ts /
//   wannier.ts (Bloch's central equation; Jaksch et al., PRL 81, 3108 (1998) for J);
// - a second lattice of the same period: the plain lattice at the summed depth;
// - a commensurate period-2 superlattice: the two lowest bands of a plane-wave supercell
//   calculation of V1 sin^2(k1 x) + V2 sin^2(k1 x / 2 + phi) diagonalised with ml-matrix
//   (Ashcroft & Mermin ch. 9), against the bands of the Wannier Hamiltonian;
// - an incommensurate (golden-ratio) superlattice: a dense sine-basis (spectral) calculation
//   of a finite box with ml-matrix, with its own projected-position Wannier functions.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { combinedLatticeAxis } from '../../src/physics/combinedLatticeWannier.js';
import { latticeAxisParameters } from '../../src/physics/latticeAxis.js';
import { latticeBand1d, meanBandEnergyEr } from '../../src/physics/bandStructure.js';
import { ParameterError } from '../../src/physics/parameterError.js';

const golden = (1 + Math.sqrt(5)) / 2;

describe('combined lattice: the plain lattice as the limit', () => {
  it('without a second lattice, J and int |w|^4 equal the plane-wave values (bandStructure.ts, wannier.ts)', () => {
    for (const s of [3, 10, 25]) {
      const ref = latticeAxisParameters(s);
      const r = combinedLatticeAxis({ depthEr: s, siteCount: 20, periodic: false, extra: [] });
      // Finite differences with Richardson extrapolation (32 and 64 points per site): measured
      // relative errors 3e-7 (3 E_r) to 6e-6 (30 E_r); 2e-5 leaves a margin.
      expect(Math.abs(r.reference.hoppingEr / ref.tunnellingEr - 1)).toBeLessThan(2e-5);
      expect(Math.abs(r.reference.integralW4PerSite / ref.integralW4PerSite - 1)).toBeLessThan(2e-5);
      // The on-site energy of a Wannier function is the band mean (1/M) sum_q E_0(q).
      expect(Math.abs(r.reference.onsiteEr - meanBandEnergyEr(latticeBand1d(s)))).toBeLessThan(2e-4 * s);
      for (let i = 0; i < 20; i++) {
        // Every window sees the same potential: site values equal the reference to round-off.
        expect(Math.abs(r.hoppingEr[i] / r.reference.hoppingEr - 1)).toBeLessThan(1e-9);
        expect(Math.abs(r.onsiteShiftEr[i])).toBeLessThan(1e-9);
      }
      // Next-nearest hopping of the plain lattice (latticeAxis.ts, plane waves).
      expect(Math.abs(Math.abs(r.couplingsEr[5 * (r.couplingRange + 1) + 2]) - Math.abs(ref.nextNearestTunnellingEr))).toBeLessThan(2e-5 * ref.tunnellingEr + 1e-9);
    }
  });

  it('a second lattice of the same period (P = 1, phase 0) is the plain lattice at the summed depth', () => {
    // V1 sin^2(pi x) + V2 sin^2(pi x) = (V1 + V2) sin^2(pi x): J and int|w|^4 at s1 + V2.
    const s1 = 6;
    const v2 = 3;
    const r = combinedLatticeAxis({ depthEr: s1, siteCount: 8, periodic: false, extra: [{ amplitudeEr: v2, periodSites: 1, phaseRad: 0 }] });
    const deeper = latticeAxisParameters(s1 + v2);
    const plain = latticeAxisParameters(s1);
    for (let i = 0; i < 8; i++) {
      // Each value by the same discretisation as the reference: the ratio cancels most of the
      // finite-difference error, the product with the plane-wave value is within 2e-5.
      expect(Math.abs(((r.hoppingEr[i] / r.reference.hoppingEr) * plain.tunnellingEr) / deeper.tunnellingEr - 1)).toBeLessThan(2e-5);
      expect(Math.abs(((r.integralW4PerSite[i] / r.reference.integralW4PerSite) * plain.integralW4PerSite) / deeper.integralW4PerSite - 1)).toBeLessThan(2e-5);
      // On-site shift = band-mean difference of the two plain lattices.
      const shift = meanBandEnergyEr(latticeBand1d(s1 + v2)) - meanBandEnergyEr(latticeBand1d(s1));
      expect(Math.abs(r.onsiteShiftEr[i] - shift)).toBeLessThan(1e-4);
    }
  });
});

/** Two lowest bands of V = s1 sin^2(xi) + V2 sin^2(xi / 2 + phi) (xi = k1 x) at supercell quasi-momentum q (units k1), by plane waves. */
function supercellBands(s1: number, v2: number, phi: number, q: number, cutoff = 40): [number, number] {
  // Basis exp(i (q + m) xi), m = -cutoff..cutoff; H = A + iB embedded as [[A, -B], [B, A]] (each eigenvalue twice).
  const n = 2 * cutoff + 1;
  const A = new Matrix(n, n);
  const B = new Matrix(n, n);
  for (let i = 0; i < n; i++) {
    const m = i - cutoff;
    A.set(i, i, (q + m) ** 2 + s1 / 2 + v2 / 2);
    if (i + 2 < n) {
      A.set(i, i + 2, -s1 / 4);
      A.set(i + 2, i, -s1 / 4);
    }
    if (i + 1 < n) {
      // <m|V|m+1> = V_(-1) = -(V2/4) exp(-2 i phi); <m+1|V|m> its conjugate.
      A.set(i, i + 1, (-v2 / 4) * Math.cos(2 * phi));
      A.set(i + 1, i, (-v2 / 4) * Math.cos(2 * phi));
      B.set(i, i + 1, (v2 / 4) * Math.sin(2 * phi));
      B.set(i + 1, i, (-v2 / 4) * Math.sin(2 * phi));
    }
  }
  const M = new Matrix(2 * n, 2 * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      M.set(i, j, A.get(i, j));
      M.set(i + n, j + n, A.get(i, j));
      M.set(i, j + n, -B.get(i, j));
      M.set(i + n, j, B.get(i, j));
    }
  }
  const e = new EigenvalueDecomposition(M, { assumeSymmetric: true }).realEigenvalues.sort((a, b) => a - b);
  return [e[0], e[2]];
}

describe('combined lattice: commensurate period-2 superlattice against plane-wave supercell bands', () => {
  it('the Wannier Hamiltonian (couplings up to 5 sites) reproduces both mini-bands', () => {
    const s1 = 8;
    const v2 = 1.5;
    const phi = 0.3; // generic: unequal on-site energies and unequal alternating bonds
    const r = combinedLatticeAxis({ depthEr: s1, siteCount: 40, periodic: false, extra: [{ amplitudeEr: v2, periodSites: 2, phaseRad: phi }] });
    const R = r.couplingRange + 1;
    const h = (i: number, j: number): number => (j >= i ? r.couplingsEr[i * R + (j - i)] : r.couplingsEr[j * R + (i - j)]);
    const i0 = 20; // even site A; i0 + 1 is site B
    const tbBands = (q: number): [number, number] => {
      // Bloch Hamiltonian of the two-site cell; a displacement of r sites has phase exp(i q pi r).
      let aa = 0;
      let bb = 0;
      let abRe = 0;
      let abIm = 0;
      for (let d = -r.couplingRange; d <= r.couplingRange; d++) {
        const c = Math.cos(q * Math.PI * d);
        const sn = Math.sin(q * Math.PI * d);
        if (d % 2 === 0) {
          aa += h(i0, i0 + d) * c;
          bb += h(i0 + 1, i0 + 1 + d) * c;
        } else {
          abRe += h(i0, i0 + d) * c;
          abIm += h(i0, i0 + d) * sn;
        }
      }
      const mean = (aa + bb) / 2;
      const half = Math.sqrt(((aa - bb) / 2) ** 2 + abRe * abRe + abIm * abIm);
      return [mean - half, mean + half];
    };
    const pw0 = supercellBands(s1, v2, phi, 0);
    const tb0 = tbBands(0);
    let worst = 0;
    for (const q of [0, 0.1, 0.25, 0.4, 0.5]) {
      const pw = supercellBands(s1, v2, phi, q);
      const tb = tbBands(q);
      for (let b = 0; b < 2; b++) worst = Math.max(worst, Math.abs(tb[b] - tb0[0] - (pw[b] - pw0[0])));
    }
    // The mini-band widths and the gap between them are ~1e-2 to 1 E_r. Measured: 2e-7 E_r
    // (couplings beyond range 5 and finite differences; with range 3 it was 4e-6). Tolerance 1e-6 E_r.
    expect(worst).toBeLessThan(1e-6);
    // The superlattice really changes things: the two bonds differ and A and B differ.
    expect(Math.abs(r.hoppingEr[i0] - r.hoppingEr[i0 + 1])).toBeGreaterThan(1e-3);
    expect(Math.abs(r.onsiteShiftEr[i0] - r.onsiteShiftEr[i0 + 1])).toBeGreaterThan(0.1);
  });
});

/**
 * Wannier functions of wells j0 - m .. j0 + m in a hard-walled box, in the sine basis
 * sqrt(2/L) sin(n pi y / L) (spectral; dense ml-matrix diagonalisation), potential
 * s1 sin^2(pi x) + V2 sin^2(pi x / P + phi) with x in sites. Returns J to the right neighbour,
 * on-site energies and int |w|^4 of the wells j0 and j0 + 1.
 */
function sineBasisWannier(s1: number, v2: number, P: number, phi: number, j0: number, m: number) {
  const W = 2 * m + 2; // wells j0 - m .. j0 + m + 1
  const left = j0 - m - 0.5; // sites
  const L = W * Math.PI; // box length in xi = pi x
  const Nb = W * 16;
  const Q = W * 96;
  const dxi = L / Q;
  const grid = new Float64Array(Q);
  const pot = new Float64Array(Q);
  for (let k = 0; k < Q; k++) {
    const xi = (k + 0.5) * dxi;
    const x = left + xi / Math.PI;
    grid[k] = x;
    pot[k] = s1 * Math.sin(Math.PI * x) ** 2 + v2 * Math.sin((Math.PI * x) / P + phi) ** 2;
  }
  const basis = new Float64Array(Nb * Q);
  for (let n = 0; n < Nb; n++) for (let k = 0; k < Q; k++) basis[n * Q + k] = Math.sqrt(2 / L) * Math.sin(((n + 1) * Math.PI * (k + 0.5) * dxi) / L);
  const H = new Matrix(Nb, Nb);
  for (let a = 0; a < Nb; a++) {
    for (let b = a; b < Nb; b++) {
      let s = 0;
      for (let k = 0; k < Q; k++) s += basis[a * Q + k] * pot[k] * basis[b * Q + k];
      s *= dxi;
      if (a === b) s += ((a + 1) * Math.PI / L) ** 2;
      H.set(a, b, s);
      H.set(b, a, s);
    }
  }
  const evd = new EigenvalueDecomposition(H, { assumeSymmetric: true });
  const order = evd.realEigenvalues.map((e, j) => ({ e, j })).sort((p, q) => p.e - q.e).slice(0, W);
  const states = order.map(({ j }) => {
    const f = new Float64Array(Q);
    for (let n = 0; n < Nb; n++) {
      const c = evd.eigenvectorMatrix.get(n, j);
      for (let k = 0; k < Q; k++) f[k] += c * basis[n * Q + k];
    }
    return f;
  });
  const X = new Matrix(W, W);
  for (let a = 0; a < W; a++) {
    for (let b = a; b < W; b++) {
      let s = 0;
      for (let k = 0; k < Q; k++) s += states[a][k] * grid[k] * states[b][k];
      X.set(a, b, s * dxi);
      X.set(b, a, s * dxi);
    }
  }
  const xe = new EigenvalueDecomposition(X, { assumeSymmetric: true });
  const xorder = xe.realEigenvalues.map((c, j) => ({ c, j })).sort((p, q) => p.c - q.c);
  const wannier = (i: number) => {
    const col = xorder[i].j;
    const f = new Float64Array(Q);
    for (let a = 0; a < W; a++) for (let k = 0; k < Q; k++) f[k] += xe.eigenvectorMatrix.get(a, col) * states[a][k];
    const at = Math.floor(((xorder[i].c - left) * Math.PI) / dxi);
    const sign = f[at] < 0 ? -1 : 1;
    let w4 = 0;
    for (let k = 0; k < Q; k++) w4 += f[k] ** 4;
    // int |w|^4 dx with x in sites: dx = dxi / pi and w(x) = sqrt(pi) w(xi).
    return { col, sign, w4: w4 * dxi * Math.PI };
  };
  const hij = (i: number, j: number) => {
    const wi = wannier(i);
    const wj = wannier(j);
    let s = 0;
    for (let a = 0; a < W; a++) s += xe.eigenvectorMatrix.get(a, wi.col) * order[a].e * xe.eigenvectorMatrix.get(a, wj.col);
    return s * wi.sign * wj.sign;
  };
  const i0 = m; // well j0
  return {
    hopping: -hij(i0, i0 + 1),
    onsite: [hij(i0, i0), hij(i0 + 1, i0 + 1)],
    w4: [wannier(i0).w4, wannier(i0 + 1).w4],
  };
}

describe('combined lattice: incommensurate superlattice against a sine-basis calculation', () => {
  it('J, on-site energy differences and int |w|^4 agree at golden-ratio period', () => {
    const s1 = 10;
    const v2 = 2;
    const phi = 0.7;
    const j0 = 21;
    const ref = sineBasisWannier(s1, v2, golden, phi, j0, 6);
    const r = combinedLatticeAxis({ depthEr: s1, siteCount: 40, periodic: false, extra: [{ amplitudeEr: v2, periodSites: golden, phaseRad: phi }] });
    // Finite differences (O(h^4) after extrapolation) against a spectral basis: 3e-5 relative
    // on J (J ~ 0.02 E_r), 1e-5 E_r on on-site differences (~1 E_r), 3e-5 relative on int|w|^4.
    expect(Math.abs(r.hoppingEr[j0] / ref.hopping - 1)).toBeLessThan(3e-5);
    expect(Math.abs(r.onsiteShiftEr[j0] - r.onsiteShiftEr[j0 + 1] - (ref.onsite[0] - ref.onsite[1]))).toBeLessThan(1e-5);
    expect(Math.abs(r.integralW4PerSite[j0] / ref.w4[0] - 1)).toBeLessThan(3e-5);
    expect(Math.abs(r.integralW4PerSite[j0 + 1] / ref.w4[1] - 1)).toBeLessThan(3e-5);
    // and the quasi-periodic potential makes every bond different
    expect(Math.abs(r.hoppingEr[j0] - r.hoppingEr[j0 + 1])).toBeGreaterThan(1e-4);
  }, 60_000);

  it('the window margin is converged: 10 and 18 wells of margin agree to 1e-9 relative (s1 = 4)', () => {
    const input = { depthEr: 4, siteCount: 24, periodic: false, extra: [{ amplitudeEr: 1, periodSites: golden, phaseRad: 0.2 }] };
    const a = combinedLatticeAxis({ ...input, marginSites: 10 });
    const b = combinedLatticeAxis({ ...input, marginSites: 18 });
    for (let i = 0; i < 23; i++) {
      expect(Math.abs(a.hoppingEr[i] / b.hoppingEr[i] - 1)).toBeLessThan(1e-9);
      expect(Math.abs(a.integralW4PerSite[i] / b.integralW4PerSite[i] - 1)).toBeLessThan(1e-9);
      expect(Math.abs(a.onsiteShiftEr[i] - b.onsiteShiftEr[i])).toBeLessThan(1e-9);
    }
  }, 60_000);

  it('refuses a second lattice so strong that the band is no longer one state per well', () => {
    // V2 = 40 E_r with period 2 empties every other well of the 4 E_r main lattice.
    expect(() => combinedLatticeAxis({ depthEr: 4, siteCount: 16, periodic: false, extra: [{ amplitudeEr: 40, periodSites: 2, phaseRad: 0 }] })).toThrow(ParameterError);
    expect(() => combinedLatticeAxis({ depthEr: 4, siteCount: 16, periodic: false, extra: [{ amplitudeEr: 40, periodSites: 2, phaseRad: 0 }] })).toThrow(/one state per well/);
  });
});
