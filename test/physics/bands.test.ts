// Band structure, Wannier functions and hopping of the 1D lattice s E_r sin^2(kx), checked
// against Mathieu characteristic values (tabulated, and from an independent continued-fraction
// algorithm), against ml-matrix as a reference eigen-solver, and against analytic limits.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import {
  bandEdgesEr,
  blochEnergiesEr,
  latticeBand1d,
  meanBandDepthDerivative,
  meanBandEnergyEr,
  planeWaveCutoffFor,
  planeWaveHamiltonian,
  quasiMomentumCountFor,
} from '../../src/physics/bandStructure.js';
import { latticeAxisParameters } from '../../src/physics/latticeAxis.js';
import { tridiagonalEigenvalue, tridiagonalEigenvector } from '../../src/numerics/tridiagonalBisection.js';
import { tunnellingEr, wannierFunction1d } from '../../src/physics/wannier.js';

// --- Mathieu characteristic values by an independent algorithm -----------------------------
// Continued-fraction equations for the Fourier coefficients of ce_0 and se_1 (DLMF 28.4.5 and
// 28.4.7, the recurrences behind A&S 20.2.21 and 20.2.23):
//   a_0:  a - 2Q^2 / (a - 4 - Q^2 / (a - 16 - Q^2 / (a - 36 - ...))) = 0
//   b_1:  a - 1 + Q - Q^2 / (a - 9 - Q^2 / (a - 25 - ...)) = 0
// Below its first pole each left-hand side rises monotonically from -infinity, so its lowest
// root is found by stepping up from a = -2Q - 1 (below every eigenvalue) and bisecting. This
// is root finding on a continued fraction, not a matrix diagonalisation.
function continuedFraction(a: number, Q: number, squares: (m: number) => number): { value: number; denominator: number } {
  let tail = 0;
  for (let m = 80; m >= 2; m--) tail = (Q * Q) / (a - squares(m) - tail);
  const denominator = a - squares(1) - tail;
  return { value: (Q * Q) / denominator, denominator };
}

function mathieuA0(Q: number): number {
  const f = (a: number) => {
    const cf = continuedFraction(a, Q, (m) => 4 * m * m);
    return { value: a - 2 * cf.value, denominator: cf.denominator };
  };
  return lowestRoot(f, -2 * Q - 1, 0.01 * (1 + Math.sqrt(Q)));
}

function mathieuB1(Q: number): number {
  const f = (a: number) => {
    const cf = continuedFraction(a, Q, (m) => (2 * m + 1) ** 2);
    return { value: a - 1 + Q - cf.value, denominator: cf.denominator };
  };
  return lowestRoot(f, -2 * Q - 1, 0.01 * (1 + Math.sqrt(Q)));
}

function lowestRoot(f: (a: number) => { value: number; denominator: number }, start: number, step: number): number {
  let lo = start;
  expect(f(lo).value).toBeLessThan(0);
  let hi = lo;
  for (;;) {
    const next = hi + step;
    const r = f(next);
    if (r.denominator >= 0) {
      step /= 2; // would cross the first pole: refine
      continue;
    }
    if (r.value >= 0) {
      hi = next;
      break;
    }
    lo = next;
    hi = next;
  }
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    if (f(mid).value < 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

// Tabulated values. Abramowitz & Stegun Table 20.1 lists a_0 and b_1 for q = 0(5)25 to 8
// decimals; the longer digits below are the same numbers as given in J. Burkardt's
// test_values collection (MATHIEU_EVEN_VALUES / MATHIEU_ODD_VALUES, computed with Mathematica's
// MathieuCharacteristicA/B, citing A&S) and match scipy.special.mathieu_a/b golden values.
const tabulated = [
  { Q: 5, a0: -5.800046020851508, b1: -5.790080598637771 },
  { Q: 25, a0: -40.25677954656679, b1: -40.25677898468416 },
];

describe('lowest band edges against Mathieu characteristic values', () => {
  it('continued-fraction solver reproduces the tabulated a_0, b_1 (validates the reference)', () => {
    for (const t of tabulated) {
      // 1e-9: the table's own 8-decimal rounding is 5e-9; the long digits agree much better.
      expect(Math.abs(mathieuA0(t.Q) - t.a0)).toBeLessThan(1e-9);
      expect(Math.abs(mathieuB1(t.Q) - t.b1)).toBeLessThan(1e-9);
    }
  });

  it('E(q=0) = s/2 + a_0(s/4) and E(zone edge) = s/2 + b_1(s/4) at the tabulated depths, to 1e-6', () => {
    for (const t of tabulated) {
      const s = 4 * t.Q;
      const edges = bandEdgesEr(s);
      // 1e-6 as required; in practice the agreement is ~1e-14 (double precision).
      expect(Math.abs(edges.lowestBottomEr - (s / 2 + t.a0))).toBeLessThan(1e-6);
      expect(Math.abs(edges.lowestTopEr - (s / 2 + t.b1))).toBeLessThan(1e-6);
      expect(Math.abs(edges.lowestBottomEr - (s / 2 + t.a0))).toBeLessThan(1e-12);
    }
  });

  it('agrees with the continued-fraction a_0, b_1 from 0.5 to 400 E_r, to 1e-9', () => {
    for (const s of [0.5, 1, 3, 7.3, 13, 30, 60, 150, 400]) {
      const Q = s / 4;
      const edges = bandEdgesEr(s);
      expect(Math.abs(edges.lowestBottomEr - (s / 2 + mathieuA0(Q)))).toBeLessThan(1e-9);
      expect(Math.abs(edges.lowestTopEr - (s / 2 + mathieuB1(Q)))).toBeLessThan(1e-9);
    }
  });

  it('J + J_3 + J_5 equals a quarter of the tabulated band width (b_1 - a_0)/4', () => {
    // Cosine series E_0(q) = const - 2 sum_n J_n cos(n q a): E(edge) - E(0) = 4 (J_1 + J_3 + ...).
    for (const t of tabulated) {
      const band = latticeBand1d(4 * t.Q);
      const oddSum = tunnellingEr(band, 1) + tunnellingEr(band, 3) + tunnellingEr(band, 5);
      // Absolute 1e-13 E_r: the round-off of the tabulated digits (~1e-14 on values of ~40).
      expect(Math.abs(oddSum - (t.b1 - t.a0) / 4)).toBeLessThan(1e-13);
    }
  });
});

describe('tridiagonal eigen-solver against ml-matrix EigenvalueDecomposition', () => {
  it('three lowest eigenvalues and the lowest eigenvector agree', () => {
    for (const s of [0.5, 4, 13, 80, 400]) {
      for (const q of [-1, -0.37, 0, 0.5, 0.99]) {
        const L = planeWaveCutoffFor(s);
        const n = 2 * L + 1;
        const { diag, off } = planeWaveHamiltonian(s, q, L);
        const H = new Matrix(n, n);
        for (let i = 0; i < n; i++) {
          H.set(i, i, diag[i]!);
          if (i + 1 < n) {
            H.set(i, i + 1, off[i]!);
            H.set(i + 1, i, off[i]!);
          }
        }
        const evd = new EigenvalueDecomposition(H, { assumeSymmetric: true });
        const reference = evd.realEigenvalues; // ascending (checked below)
        for (let b = 0; b < 3; b++) {
          // 1e-11 E_r: both solvers are backward stable, errors ~ eps * ||H|| ~ 1e-13.
          expect(Math.abs(tridiagonalEigenvalue(diag, off, b) - reference[b]!)).toBeLessThan(1e-11);
          if (b > 0) expect(reference[b]!).toBeGreaterThanOrEqual(reference[b - 1]!);
        }
        const vector = new Float64Array(n);
        tridiagonalEigenvector(diag, off, tridiagonalEigenvalue(diag, off, 0), vector);
        let dot = 0;
        for (let i = 0; i < n; i++) dot += vector[i]! * evd.eigenvectorMatrix.get(i, 0);
        // |<v|v_ref>| = 1 to 1e-12: the gap to band 1 is >= 0.25 E_r at s >= 0.5.
        expect(Math.abs(Math.abs(dot) - 1)).toBeLessThan(1e-12);
      }
    }
  });
});

describe('convergence of the numerical parameters', () => {
  it('plane-wave cutoff: raising L by 8 changes the two lowest bands by < 1e-12 E_r', () => {
    for (const s of [0.5, 5, 40, 150, 400]) {
      const L = planeWaveCutoffFor(s);
      for (const q of [0, 0.5, 1]) {
        const a = blochEnergiesEr(s, q, 2, L);
        const b = blochEnergiesEr(s, q, 2, L + 8);
        expect(Math.abs(a[0]! - b[0]!)).toBeLessThan(1e-12);
        expect(Math.abs(a[1]! - b[1]!)).toBeLessThan(1e-12);
      }
    }
  });

  it('quasi-momentum grid: default M agrees with M = 512 for J, int|w|^4 and the spread', () => {
    for (const s of [0.5, 0.9, 1, 2.9, 3, 4.9, 5, 13, 60]) {
      const small = latticeAxisParameters(s);
      const large = latticeAxisParameters(s, { quasiMomentumCount: 512 });
      // Relative 1e-10; for the hopping an absolute floor of 1e-13 E_r (round-off of the
      // band energies, see latticeAxis.ts).
      expect(Math.abs(small.tunnellingEr - large.tunnellingEr)).toBeLessThan(1e-10 * large.tunnellingEr + 1e-13);
      expect(Math.abs(small.integralW4PerSite / large.integralW4PerSite - 1)).toBeLessThan(1e-10);
      expect(Math.abs(small.wannierSpreadSites / large.wannierSpreadSites - 1)).toBeLessThan(1e-10);
    }
    expect(quasiMomentumCountFor(0.5)).toBeGreaterThan(quasiMomentumCountFor(13));
  });
});

describe('analytic limits of the band structure', () => {
  it('free particle (s -> 0): E_0 = q^2, E_1 = (2 - |q|)^2, J -> 2/pi^2', () => {
    for (const q of [0, 0.3, -0.8]) {
      const e = blochEnergiesEr(0, q, 2);
      expect(Math.abs(e[0]! - q * q)).toBeLessThan(1e-12);
      expect(Math.abs(e[1]! - (2 - Math.abs(q)) ** 2)).toBeLessThan(1e-12);
    }
    // -(1/2) int_{-1}^{1} q^2 cos(pi q) dq = 2/pi^2. The band has a kink at the zone edge, so
    // the grid sum converges only like 1/M^2: 5e-5 at M = 1024.
    const band = latticeBand1d(1e-9, { quasiMomentumCount: 1024 });
    expect(Math.abs(tunnellingEr(band, 1) - 2 / Math.PI ** 2)).toBeLessThan(5e-5);
  });

  it('E(q) is even in q', () => {
    for (const s of [2, 20]) {
      const band = latticeBand1d(s, { quasiMomentumCount: 16 });
      for (let j = 1; j < 16; j++) {
        expect(band.energiesEr[j]).toBe(band.energiesEr[16 - j]);
      }
    }
  });

  it('deep lattice: band spacing -> hbar omega = 2 sqrt(s) E_r, d<E_0>/ds -> 1/(2 sqrt s)', () => {
    // Harmonic approximation of each well: s sin^2(kx) ~ s (kx)^2, hbar omega = 2 sqrt(s) E_r
    // (e.g. Jaksch et al., PRL 81, 3108 (1998)). From DLMF 28.8.1 (large-q expansion of a_m),
    // E_1 - E_0 = 2 sqrt s - 1 + ..., so the spacing ratio rises to 1 from below, while
    // <E_0> = sqrt s - 1/4 - 1/(16 sqrt s) + ... gives d<E_0>/ds = 1/(2 sqrt s) (1 + 1/(16 s) + O(s^-3/2)).
    let previousSpacing = 0;
    let previousSlope = Infinity;
    for (const s of [10, 40, 160, 400]) {
      const band = latticeBand1d(s);
      const spacingRatio =
        (meanBandEnergyEr({ ...band, energiesEr: band.excitedEnergiesEr }) - meanBandEnergyEr(band)) / (2 * Math.sqrt(s));
      const slopeRatio = meanBandDepthDerivative(band) * 2 * Math.sqrt(s);
      expect(spacingRatio).toBeLessThan(1);
      expect(spacingRatio).toBeGreaterThan(previousSpacing);
      expect(slopeRatio).toBeGreaterThan(1);
      expect(slopeRatio).toBeLessThan(previousSlope);
      // Next term of the expansion is 3/(32 s^(3/2)); 0.2 s^(-3/2) bounds it.
      expect(Math.abs(slopeRatio - (1 + 1 / (16 * s)))).toBeLessThan(0.2 / s ** 1.5);
      previousSpacing = spacingRatio;
      previousSlope = slopeRatio;
    }
    expect(previousSpacing).toBeGreaterThan(0.97);
  });

  it('band bottom follows the asymptotic expansion of a_0 (DLMF 28.8.1) in deep lattices', () => {
    // a_0(Q) ~ -2Q + 2 sqrt Q - 1/4 - 1/(32 sqrt Q) - 3/(256 Q) - ..., Q = s/4, so
    // E(q=0) = s/2 + a_0 ~ sqrt s - 1/4 - 1/(16 sqrt s) - 3/(64 s); the next term is about
    // 0.05 s^(-3/2), bounded here by 0.1 s^(-3/2).
    for (const s of [100, 200, 400]) {
      const bottom = bandEdgesEr(s).lowestBottomEr;
      const asymptotic = Math.sqrt(s) - 0.25 - 1 / (16 * Math.sqrt(s)) - 3 / (64 * s);
      expect(Math.abs(bottom - asymptotic)).toBeLessThan(0.1 / s ** 1.5);
    }
  });

  it('Hellmann-Feynman d<E_0>/ds matches a finite difference of <E_0>', () => {
    for (const s of [1, 8, 50]) {
      const h = 1e-4 * s;
      const fd = (meanBandEnergyEr(latticeBand1d(s + h)) - meanBandEnergyEr(latticeBand1d(s - h))) / (2 * h);
      // Central difference error ~ h^2 E''' ~ 1e-9.
      expect(Math.abs(meanBandDepthDerivative(latticeBand1d(s)) - fd)).toBeLessThan(1e-8);
    }
  });
});

describe('Wannier function of the lowest band', () => {
  it('is normalised, real, even, centred and orthogonal to its neighbour', () => {
    for (const s of [0.5, 3, 13, 100]) {
      const w = wannierFunction1d(latticeBand1d(s));
      const N = w.real.length;
      const P = w.pointsPerSite;
      let maxAbs = 0;
      let maxImag = 0;
      let asymmetry = 0;
      for (let i = 0; i < N; i++) {
        maxAbs = Math.max(maxAbs, Math.abs(w.real[i]!));
        maxImag = Math.max(maxImag, Math.abs(w.imag[i]!));
        // Grid point i sits at xi_i = -M/2 + i/P, so -xi_i is index N - i (mod N).
        asymmetry = Math.max(asymmetry, Math.abs(w.real[i]! - w.real[(N - i) % N]!));
      }
      let neighbourOverlap = 0;
      for (let i = 0; i < N; i++) neighbourOverlap += w.real[i]! * w.real[(i + P) % N]!;
      neighbourOverlap /= P;
      // All at the level of double-precision round-off (sums of ~1e3 terms).
      expect(Math.abs(w.normalisation - 1)).toBeLessThan(1e-12);
      expect(maxImag / maxAbs).toBeLessThan(1e-12);
      expect(asymmetry / maxAbs).toBeLessThan(1e-12);
      expect(Math.abs(w.centreSites)).toBeLessThan(1e-12);
      expect(Math.abs(neighbourOverlap)).toBeLessThan(1e-12);
    }
  });

  it('is maximally localised: any other smooth gauge adds exactly n^2 alpha^2 / 2 to the spread', () => {
    // Marzari & Vanderbilt, PRB 56, 12847 (1997): for one band in 1D the gauge-dependent part
    // of <x^2> - <x>^2 is (a/2pi) int (A(k) - <A>)^2 dk. Our gauge has A = 0; the extra phase
    // theta(q) = alpha sin(n pi q) shifts A by -theta', adding (a/2pi) int theta'^2 dk =
    // n^2 alpha^2 / 2 sites^2. Agreement to 1e-9 shows the spread of our w is the minimum.
    for (const s of [1, 5, 20]) {
      const band = latticeBand1d(s, { quasiMomentumCount: 64 });
      const optimal = wannierFunction1d(band);
      for (const [alpha, n] of [
        [0.3, 1],
        [0.6, 1],
        [0.3, 2],
        [1, 1],
      ] as const) {
        const other = wannierFunction1d(band, { gaugePhase: (q) => alpha * Math.sin(n * Math.PI * q) });
        const added = other.spreadSites ** 2 - optimal.spreadSites ** 2;
        expect(added).toBeGreaterThan(0);
        expect(Math.abs(added - (n * n * alpha * alpha) / 2)).toBeLessThan(1e-9);
        expect(Math.abs(other.normalisation - 1)).toBeLessThan(1e-12);
      }
    }
  });

  it('approaches the harmonic-oscillator ground state in deep lattices', () => {
    // Each well is harmonic with oscillator length a_ho = 1/(k s^(1/4)) (hbar omega = 2 sqrt(s)
    // E_r). Gaussian ground state (textbook): int |psi|^4 dx = 1/(sqrt(2 pi) a_ho), rms width
    // a_ho / sqrt 2. In lattice units (a = pi/k): int |w|^4 dxi -> sqrt(pi/2) s^(1/4) and
    // spread -> 1/(sqrt 2 pi s^(1/4)). The real Wannier function is wider (the sin^2 well is
    // softer than its parabola), so the overlap ratio rises towards 1 from below.
    let previous = 0;
    for (const s of [2, 5, 10, 20, 40, 80, 150, 200]) {
      const axis = latticeAxisParameters(s);
      const overlapRatio = axis.integralW4PerSite / (Math.sqrt(Math.PI / 2) * s ** 0.25);
      const spreadRatio = axis.wannierSpreadSites / (1 / (Math.SQRT2 * Math.PI * s ** 0.25));
      expect(overlapRatio).toBeLessThan(1);
      expect(overlapRatio).toBeGreaterThan(previous);
      expect(spreadRatio).toBeGreaterThan(1);
      previous = overlapRatio;
    }
    // Leading anharmonic correction ~ 1/(4 sqrt s) (measured 0.984 at 200 E_r).
    expect(previous).toBeGreaterThan(0.98);
  });
});

describe('hopping against the deep-lattice formula of Zwerger', () => {
  it('J / [(4/sqrt pi) s^(3/4) exp(-2 sqrt s)] rises monotonically towards 1 from 1 E_r up', () => {
    // Zwerger, J. Opt. B 5, S9 (2003), eq. for J from the asymptotic Mathieu band width.
    // Measured behaviour: the ratio is below 1 at every depth tested (0.58 at 1 E_r, 0.87 at
    // 13 E_r, 0.968 at 200 E_r) and rises monotonically from about 1 E_r on. Below 1 E_r it
    // rises again (0.59 at 0.5 E_r) because the formula -> 0 while J -> 2/pi^2 E_r for free
    // atoms, so monotonicity is asserted from 1 E_r.
    const zwerger = (s: number) => (4 / Math.sqrt(Math.PI)) * s ** 0.75 * Math.exp(-2 * Math.sqrt(s));
    let previous = 0;
    for (const s of [1, 2, 3, 5, 8, 10, 15, 20, 30, 40, 60, 80, 100, 150, 200]) {
      const ratio = latticeAxisParameters(s).tunnellingEr / zwerger(s);
      expect(ratio).toBeLessThan(1);
      expect(ratio).toBeGreaterThan(previous);
      previous = ratio;
    }
    expect(previous).toBeGreaterThan(0.96);
    expect(latticeAxisParameters(0.5).tunnellingEr / zwerger(0.5)).toBeGreaterThan(
      latticeAxisParameters(1).tunnellingEr / zwerger(1),
    );
  });

  it('next-nearest hopping is negative, and small against J in deep lattices', () => {
    const shallow = latticeAxisParameters(3);
    const deep = latticeAxisParameters(30);
    expect(shallow.nextNearestTunnellingEr).toBeLessThan(0);
    expect(deep.nextNearestTunnellingEr).toBeLessThan(0);
    expect(Math.abs(shallow.nextNearestTunnellingEr / shallow.tunnellingEr)).toBeGreaterThan(0.05);
    expect(Math.abs(deep.nextNearestTunnellingEr / deep.tunnellingEr)).toBeLessThan(1e-3);
    expect(deep.nextNearestResolved).toBe(true);
    // At 150 E_r J_2 (extrapolated ~1e-19 E_r) is far below the round-off of the band energies.
    expect(latticeAxisParameters(150).nextNearestResolved).toBe(false);
  });
});
