// Box and speckle disorder: statistics checked against the uniform distribution and
// against the speckle theory of Goodman, Speckle Phenomena in Optics (Roberts & Co.,
// 2007). Statistical tolerances are stated as multiples of the standard error, with
// the number of independent samples of a speckle field taken as (field area) /
// (coherence area A_c), A_c = integral |2 J1(k r)/(k r)|^2 d^2r = 4 pi / kmax^2
// (Goodman's correlation area of a uniformly filled circular pupil, here integrated in
// closed form with integral_0^inf J1(v)^2 / v dv = 1/2, the Weber-Schafheitlin integral
// integral_0^inf J_nu(t)^2 / t dt = 1/(2 nu), DLMF section 10.22, recalled from memory).
import { describe, expect, it } from 'vitest';
import { boxDisorder } from '../../src/lattice/boxDisorder.js';
import {
  BESSEL_J1_FIRST_ZERO,
  grainSitesFromAperture,
  longitudinalGrainSitesFromAperture,
  planSpeckleGrid,
  speckleField,
  speckleIntensity,
} from '../../src/lattice/speckle.js';

// ---------------------------------------------------------------------------------
// Bessel J1 from the polynomial approximations of Abramowitz & Stegun (1964):
// 9.4.4 for 0 <= x <= 3 (|error in J1/x| < 1.3e-8) and 9.4.6 for x >= 3
// (|error| < 4e-8 in the modulus f1, 9e-8 in the phase theta1).
function besselJ1(x: number): number {
  const ax = Math.abs(x);
  let value: number;
  if (ax <= 3) {
    const y = (ax / 3) * (ax / 3);
    value =
      ax *
      (0.5 +
        y *
          (-0.56249985 +
            y * (0.21093573 + y * (-0.03954289 + y * (0.00443319 + y * (-0.00031761 + y * 0.00001109))))));
  } else {
    const y = 3 / ax;
    const f1 =
      0.79788456 +
      y *
        (0.00000156 +
          y * (0.01659667 + y * (0.00017105 + y * (-0.00249511 + y * (0.00113653 - y * 0.00020033)))));
    const theta1 =
      ax -
      2.35619449 +
      y *
        (0.12499612 +
          y * (0.0000565 + y * (-0.00637879 + y * (0.00074348 + y * (0.00079824 - y * 0.00029166)))));
    value = (f1 * Math.cos(theta1)) / Math.sqrt(ax);
  }
  return x < 0 ? -value : value;
}

/** Normalised intensity autocorrelation of a circular pupil, |2 J1(v)/v|^2 (Goodman 2007). */
function airyCorrelation(v: number): number {
  if (v === 0) return 1;
  const a = (2 * besselJ1(v)) / v;
  return a * a;
}

function meanAndVariance(values: Float64Array[]): { mean: number; variance: number; count: number } {
  let sum = 0;
  let count = 0;
  for (const field of values) for (const v of field) (sum += v), count++;
  const mean = sum / count;
  let sq = 0;
  for (const field of values) for (const v of field) sq += (v - mean) * (v - mean);
  return { mean, variance: sq / count, count };
}

/** Normalised autocovariance <dI(r) dI(r+d)> / <I>^2 along a lattice displacement. */
function autocovariance(fields: Float64Array[], shape: number[], d: number[]): number {
  const dims = [...shape, 1, 1].slice(0, 3);
  const dd = [...d, 0, 0].slice(0, 3);
  const { mean } = meanAndVariance(fields);
  let sum = 0;
  let count = 0;
  for (const f of fields) {
    for (let x = 0; x + dd[0] < dims[0]; x++) {
      for (let y = 0; y + dd[1] < dims[1]; y++) {
        for (let z = 0; z + dd[2] < dims[2]; z++) {
          const a = f[(x * dims[1] + y) * dims[2] + z];
          const b = f[((x + dd[0]) * dims[1] + y + dd[1]) * dims[2] + z + dd[2]];
          sum += (a - mean) * (b - mean);
          count++;
        }
      }
    }
  }
  return sum / count / (mean * mean);
}

describe('Bessel J1 approximation used as the reference', () => {
  it('matches tabulated values (A&S Table 9.1, recalled from memory) and the first zero', () => {
    // J1(1) = 0.4400505857, J1(2) = 0.5767248078, J1(5) = -0.3275791376: A&S Table 9.1
    // (recalled from memory). Tolerance 1e-7: the stated accuracy of 9.4.4/9.4.6.
    expect(besselJ1(1)).toBeCloseTo(0.4400505857, 7);
    expect(besselJ1(2)).toBeCloseTo(0.5767248078, 7);
    expect(besselJ1(5)).toBeCloseTo(-0.3275791376, 7);
    // The constant used by the speckle code is a zero of J1 (A&S Table 9.5).
    expect(Math.abs(besselJ1(BESSEL_J1_FIRST_ZERO))).toBeLessThan(1e-7);
    expect(besselJ1(BESSEL_J1_FIRST_ZERO - 0.01)).toBeGreaterThan(0);
  });
});

describe('boxDisorder', () => {
  const n = 200_000;
  const widthW = 2.5;

  it('has the mean 0 and variance W^2/12 of a uniform distribution, within 5 sigma', () => {
    const eps = boxDisorder(n, widthW, 'box/stats');
    let sum = 0;
    for (const v of eps) sum += v;
    const mean = sum / n;
    let sq = 0;
    for (const v of eps) sq += (v - mean) * (v - mean);
    const variance = sq / n;
    // Uniform on [-W/2, W/2]: variance W^2/12, fourth central moment W^4/80 (standard
    // results). Standard errors: of the mean sqrt(W^2/12/n); of the sample variance
    // sqrt((W^4/80 - W^4/144)/n) = W^2 / sqrt(180 n).
    expect(Math.abs(mean)).toBeLessThan(5 * Math.sqrt((widthW * widthW) / 12 / n));
    expect(Math.abs(variance - (widthW * widthW) / 12)).toBeLessThan((5 * widthW * widthW) / Math.sqrt(180 * n));
  });

  it('stays inside [-W/2, W/2] and fills ten equal bins uniformly (5 sigma per bin)', () => {
    const eps = boxDisorder(n, widthW, 'box/range');
    const bins = new Array(10).fill(0);
    for (const v of eps) {
      expect(v >= -widthW / 2 && v < widthW / 2).toBe(true);
      bins[Math.floor((v / widthW + 0.5) * 10)]++;
    }
    const expected = n / 10;
    const sigma = Math.sqrt(n * 0.1 * 0.9); // binomial
    for (const count of bins) expect(Math.abs(count - expected)).toBeLessThan(5 * sigma);
  });

  it('is reproducible from its seed and changes with the seed', () => {
    const a = boxDisorder(1000, 1, 'box/7');
    const b = boxDisorder(1000, 1, 'box/7');
    const c = boxDisorder(1000, 1, 'box/8');
    expect(Buffer.from(a.buffer).equals(Buffer.from(b.buffer))).toBe(true);
    let same = 0;
    for (let i = 0; i < a.length; i++) if (a[i] === c[i]) same++;
    expect(same).toBe(0);
    expect(boxDisorder(10, 0, 'box/0').every((v) => v === 0)).toBe(true);
  });

  it('names the parameter in its errors', () => {
    expect(() => boxDisorder(10, -1, 's')).toThrow(/widthW/);
    expect(() => boxDisorder(1.5, 1, 's')).toThrow(/siteCount/);
    expect(() => boxDisorder(10, 1, '')).toThrow(/seed/);
  });
});

describe('speckle grain size from the optics', () => {
  it('puts the first zero of |2 J1(v)/v|^2 at grainSites (v = 2 pi NA r / lambda)', () => {
    const wavelengthNm = 532;
    const na = 0.5;
    const spacingNm = 266;
    const r0 = grainSitesFromAperture(wavelengthNm, na, spacingNm);
    const v = (2 * Math.PI * na * r0 * spacingNm) / wavelengthNm;
    expect(Math.abs(besselJ1(v))).toBeLessThan(1e-7);
    // The textbook Airy radius 0.61 lambda/NA (common practice, rounded to 2 digits).
    expect((r0 * spacingNm) / (wavelengthNm / na)).toBeCloseTo(0.61, 2);
  });

  it('gives the axial grain 2 lambda/NA^2 = 8 lambda (z/D)^2 with NA = D/(2z)', () => {
    // Goodman (2007) axial speckle size for a circular pupil, recalled from memory.
    const z0 = longitudinalGrainSitesFromAperture(780, 0.25, 532);
    const zOverD = 1 / (2 * 0.25);
    expect(z0 * 532).toBeCloseTo(8 * 780 * zOverD * zOverD, 9);
    expect(() => grainSitesFromAperture(532, 1.2, 266)).toThrow(/numericalAperture/);
  });
});

describe('speckle statistics on large seeded fields (Goodman 2007)', () => {
  const grainSites = 3; // first zero of the autocorrelation at exactly 3 sites
  const kmax = BESSEL_J1_FIRST_ZERO / grainSites;
  const coherenceArea = (4 * Math.PI) / (kmax * kmax);
  const shape = [512, 512];
  const seeds = ['sp/1', 'sp/2', 'sp/3', 'sp/4'];
  const fields = seeds.map((seed) => speckleIntensity({ shape, grainSites, seed }));
  const independent = (fields.length * shape[0] * shape[1]) / coherenceArea;

  it('has mean 1 and standard deviation equal to the mean (contrast 1)', () => {
    const { mean, variance } = meanAndVariance(fields);
    // Standard errors for an exponential law with `independent` samples: mean 1/sqrt(M),
    // sample variance sqrt(mu4 - sigma^4)/sqrt(M) = sqrt(8/M); 5 sigma.
    expect(Math.abs(mean - 1)).toBeLessThan(5 / Math.sqrt(independent));
    expect(Math.abs(variance / (mean * mean) - 1)).toBeLessThan(5 * Math.sqrt(8 / independent) + 0.01);
  });

  it('has an exponential intensity histogram and P(I > 3<I>) = e^-3', () => {
    const edges = [0, 0.5, 1, 1.5, 2, 3, 4, 6, Infinity];
    const counts = new Array(edges.length - 1).fill(0);
    let above3 = 0;
    let total = 0;
    for (const f of fields) {
      for (const v of f) {
        total++;
        if (v > 3) above3++;
        let b = 0;
        while (v >= edges[b + 1]) b++;
        counts[b]++;
      }
    }
    for (let b = 0; b < counts.length; b++) {
      const p = Math.exp(-edges[b]) - Math.exp(-edges[b + 1]);
      // 5 binomial standard errors with the number of independent speckles.
      expect(Math.abs(counts[b] / total - p)).toBeLessThan(5 * Math.sqrt((p * (1 - p)) / independent));
    }
    const pAbove = Math.exp(-3);
    expect(Math.abs(above3 / total - pAbove)).toBeLessThan(5 * Math.sqrt((pAbove * (1 - pAbove)) / independent));
  });

  it('has the autocorrelation |2 J1(v)/v|^2 of a circular pupil, isotropic, zero at the grain size', () => {
    // Standard error of a lag covariance of exponential speckle is about
    // sqrt(<I^2 I'^2>)/sqrt(M) <= 3/sqrt(M) = 0.008 here; tolerance 0.03.
    const cases: number[][] = [
      [1, 0],
      [0, 1],
      [2, 0],
      [0, 2],
      [2, 2],
      [3, 0],
      [0, 3],
      [4, 0],
      [5, 0],
    ];
    for (const d of cases) {
      const r = Math.hypot(d[0], d[1]);
      expect(Math.abs(autocovariance(fields, shape, d) - airyCorrelation(kmax * r))).toBeLessThan(0.03);
    }
    expect(Math.abs(autocovariance(fields, shape, [3, 0]))).toBeLessThan(0.03); // first zero
  });

  it('is identical for the same seed, differs for another, and is scaled and signed by speckleField', () => {
    const again = speckleIntensity({ shape, grainSites, seed: 'sp/1' });
    expect(Buffer.from(again.buffer).equals(Buffer.from(fields[0].buffer))).toBe(true);
    let same = 0;
    for (let i = 0; i < again.length; i++) if (again[i] === fields[1][i]) same++;
    expect(same).toBe(0);
    const repulsive = speckleField({ shape, grainSites, seed: 'sp/1', meanStrength: 0.7, sign: 'repulsive' });
    const attractive = speckleField({ shape, grainSites, seed: 'sp/1', meanStrength: 0.7, sign: 'attractive' });
    for (let i = 0; i < again.length; i += 97) {
      expect(repulsive[i]).toBe(0.7 * again[i]);
      expect(attractive[i]).toBe(-0.7 * again[i]);
    }
    expect(repulsive.every((v) => v >= 0)).toBe(true);
    expect(attractive.every((v) => v <= 0)).toBe(true);
  });
});

describe('speckle averaged over the Wannier density', () => {
  // Goodman (2007), integrated (blurred) speckle: the variance of the intensity weighted
  // by a normalised window g is <I>^2 integral |mu(d)|^2 (g * g)(d) d^2d (the general
  // result recalled from memory). For a Gaussian g of rms width sigma, g * g is a
  // Gaussian of variance 2 sigma^2, so
  //   C^2 = integral_0^inf |2 J1(k r)/(k r)|^2 exp(-r^2 / (4 sigma^2)) r dr / (2 sigma^2).
  function blurredContrastSquared(grainSites: number, sigma: number): number {
    const k = BESSEL_J1_FIRST_ZERO / grainSites;
    const rMax = 12 * sigma;
    const steps = 20000; // Simpson; the integrand is smooth, error << 1e-6
    const h = rMax / steps;
    const f = (r: number): number => (airyCorrelation(k * r) * Math.exp(-(r * r) / (4 * sigma * sigma)) * r) / (2 * sigma * sigma);
    let sum = f(0) + f(rMax);
    for (let i = 1; i < steps; i++) sum += (i % 2 === 1 ? 4 : 2) * f(i * h);
    return (sum * h) / 3;
  }

  const cases = [
    { grainSites: 3, sigma: 1, shape: [512, 512] },
    { grainSites: 3, sigma: 0.3, shape: [512, 512] },
    // grain below 2.46 sites: the generator refines the grid 2x so the intensity is resolved
    { grainSites: 1.5, sigma: 0.3, shape: [256, 256] },
  ];
  for (const { grainSites, sigma, shape } of cases) {
    it(`has the blurred-speckle contrast for grain ${grainSites}, sigma ${sigma} sites`, () => {
      const fields = ['wa/1', 'wa/2'].map((seed) =>
        speckleIntensity({ shape, grainSites, wannierWidthSites: sigma, seed }),
      );
      const { mean, variance } = meanAndVariance(fields);
      const kmax = BESSEL_J1_FIRST_ZERO / grainSites;
      const independent = (fields.length * shape[0] * shape[1] * kmax * kmax) / (4 * Math.PI);
      const expected = blurredContrastSquared(grainSites, sigma);
      expect(expected).toBeLessThan(1);
      // Mean: averaging keeps <I> = 1 (5 sigma). Variance: 5 x the exponential-law
      // standard error sqrt(8/M), an upper bound for the smoother blurred field.
      expect(Math.abs(mean - 1)).toBeLessThan(5 / Math.sqrt(independent));
      expect(Math.abs(variance / (mean * mean) - expected)).toBeLessThan(5 * Math.sqrt(8 / independent));
    });
  }

  it('refines the grid only when the intensity spectrum 2 kmax would alias', () => {
    expect(planSpeckleGrid({ shape: [64, 64], grainSites: 3, wannierWidthSites: 0.3 }).pointsPerSite).toBe(1);
    expect(planSpeckleGrid({ shape: [64, 64], grainSites: 1.5, wannierWidthSites: 0.3 }).pointsPerSite).toBe(2);
    expect(planSpeckleGrid({ shape: [64, 64], grainSites: 1.5 }).pointsPerSite).toBe(1);
  });
});

describe('1D speckle: a line across the beam', () => {
  it('has contrast 1 and the same |2 J1(v)/v|^2 correlation along the line', () => {
    const grainSites = 3;
    const kmax = BESSEL_J1_FIRST_ZERO / grainSites;
    const shape = [65536];
    const fields = [speckleIntensity({ shape, grainSites, seed: 'line/1' })];
    // Independent samples: length / integral |2 J1(k x)/(k x)|^2 dx = length k / (32/(3 pi))
    // (integral_0^inf J1(v)^2/v^2 dv = 4/(3 pi), recalled from memory); about 2.5e4.
    const independent = (shape[0] * kmax * 3 * Math.PI) / 32;
    const { mean, variance } = meanAndVariance(fields);
    expect(Math.abs(mean - 1)).toBeLessThan(5 / Math.sqrt(independent));
    expect(Math.abs(variance - 1)).toBeLessThan(5 * Math.sqrt(8 / independent));
    for (const d of [1, 2, 3]) {
      expect(Math.abs(autocovariance(fields, shape, [d]) - airyCorrelation(kmax * d))).toBeLessThan(0.05);
    }
  });
});

describe('speckle with grains smaller than the lattice spacing (folded pupil)', () => {
  it('still has contrast 1 and the |2 J1(v)/v|^2 correlation at one site', () => {
    const grainSites = 0.8;
    const shape = [256, 256];
    const fields = [speckleIntensity({ shape, grainSites, seed: 'fold/1' })];
    const kmax = BESSEL_J1_FIRST_ZERO / grainSites;
    // Grains below a site: samples are nearly independent, M ~ number of sites.
    const independent = shape[0] * shape[1];
    const { mean, variance } = meanAndVariance(fields);
    expect(Math.abs(mean - 1)).toBeLessThan(5 / Math.sqrt(independent));
    expect(Math.abs(variance - 1)).toBeLessThan(5 * Math.sqrt(8 / independent));
    expect(Math.abs(autocovariance(fields, shape, [1, 0]) - airyCorrelation(kmax))).toBeLessThan(0.03);
  });
});

describe('3D speckle: grains elongated along the beam', () => {
  const grainSites = 3;
  const z0 = 12;
  const kmax = BESSEL_J1_FIRST_ZERO / grainSites;
  // Axial correlation of a uniformly filled pupil after Fresnel propagation:
  // sinc^2(pi dz / z0) (derivation in src/lattice/speckle.ts; Goodman 2007).
  const axial = (dz: number): number => {
    const a = (Math.PI * dz) / z0;
    return dz === 0 ? 1 : (Math.sin(a) / a) ** 2;
  };
  const shape = [96, 96, 128];
  const fields = ['s3/1', 's3/2'].map((seed) =>
    speckleIntensity({ shape, grainSites, longitudinalGrainSites: z0, seed }),
  );

  it('has the transverse Airy correlation and the axial sinc^2 correlation', () => {
    // About 2.6e4 independent grains (volume / (A_c z0)); lag covariances then scatter
    // by about 0.015 (seen across seeds); tolerance 0.05.
    for (const dz of [3, 6, 12]) {
      expect(Math.abs(autocovariance(fields, shape, [0, 0, dz]) - axial(dz))).toBeLessThan(0.05);
    }
    expect(Math.abs(autocovariance(fields, shape, [1, 0, 0]) - airyCorrelation(kmax))).toBeLessThan(0.05);
    expect(Math.abs(autocovariance(fields, shape, [0, 1, 0]) - airyCorrelation(kmax))).toBeLessThan(0.05);
    expect(Math.abs(autocovariance(fields, shape, [3, 0, 0]))).toBeLessThan(0.05);
    // Longer correlation along the beam than across it.
    expect(autocovariance(fields, shape, [0, 0, 3])).toBeGreaterThan(autocovariance(fields, shape, [3, 0, 0]) + 0.5);
    const { mean, variance } = meanAndVariance(fields);
    expect(Math.abs(mean - 1)).toBeLessThan(0.05);
    expect(Math.abs(variance - 1)).toBeLessThan(0.1);
  });

  it('follows beamAxis and loses contrast when averaged over the Wannier density', () => {
    const alongX = [speckleIntensity({ shape: [128, 48, 48], grainSites, longitudinalGrainSites: z0, beamAxis: 0, seed: 's3/x' })];
    expect(Math.abs(autocovariance(alongX, [128, 48, 48], [6, 0, 0]) - axial(6))).toBeLessThan(0.1);
    expect(Math.abs(autocovariance(alongX, [128, 48, 48], [0, 0, 6]) - airyCorrelation(6 * kmax))).toBeLessThan(0.1);
    const small = [48, 48, 48];
    const sharp = speckleIntensity({ shape: small, grainSites, longitudinalGrainSites: z0, seed: 's3/w' });
    const blurred = speckleIntensity({ shape: small, grainSites, longitudinalGrainSites: z0, wannierWidthSites: 0.5, seed: 's3/w' });
    expect(meanAndVariance([blurred]).variance).toBeLessThan(0.95 * meanAndVariance([sharp]).variance);
  });

  it('keeps the Talbot revival of the discrete spectrum far beyond the lattice', () => {
    const plan = planSpeckleGrid({ shape, grainSites, longitudinalGrainSites: z0 });
    const pupilRadiusCells = (kmax * plan.paddedSites[0]) / (2 * Math.PI);
    expect(z0 * pupilRadiusCells * pupilRadiusCells).toBeGreaterThanOrEqual(32 * (shape[2] - 1));
    expect(plan.paddedSites[0]).toBeGreaterThanOrEqual(shape[0] + 4 * grainSites);
  });

  it('asks for what it needs, naming the parameter', () => {
    expect(() => speckleIntensity({ shape: [8, 8, 8], grainSites: 3, seed: 's' })).toThrow(/longitudinalGrainSites/);
    expect(() => speckleIntensity({ shape: [8, 8], grainSites: 3, beamAxis: 1, seed: 's' })).toThrow(/beamAxis/);
    expect(() => speckleIntensity({ shape: [8, 8, 8], grainSites: 3, longitudinalGrainSites: 9, beamAxis: 3, seed: 's' })).toThrow(/beamAxis/);
    expect(() => speckleIntensity({ shape: [8, 0], grainSites: 3, seed: 's' })).toThrow(/shape\[1\]/);
    expect(() => speckleIntensity({ shape: [8, 8], grainSites: -1, seed: 's' })).toThrow(/grainSites/);
    expect(() => speckleIntensity({ shape: [4096, 4096], grainSites: 3, seed: 's' })).toThrow(/too large/);
    expect(() => speckleField({ shape: [8], grainSites: 3, seed: 's', meanStrength: -1, sign: 'repulsive' })).toThrow(/meanStrength/);
  });
});
