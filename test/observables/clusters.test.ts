// Superfluid cluster labelling and site classification. Hand-made masks are worked
// out by hand in the comments; the random-mask checks use the site-percolation
// threshold of the square lattice, p_c = 0.59274621(13) (Newman & Ziff, PRL 85, 4104
// (2000)); the classification is checked on hand-made sites and on the exact atomic
// limit (J = 0) of the Bose-Hubbard site at finite temperature.
import { describe, expect, it } from 'vitest';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { labelSuperfluidClusters } from '../../src/observables/superfluidClusters.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';
import { classifySites, defaultPhaseThresholds } from '../../src/observables/siteClassification.js';

/** Mask from rows of '1'/'0' characters: row = first axis (x), column = second axis (y). */
function maskFromRows(rows: string[]): Uint8Array {
  return Uint8Array.from(rows.join('').split(''), (c) => (c === '1' ? 1 : 0));
}

function randomMask(siteCount: number, p: number, seed: string): Uint8Array {
  const random = seededRandom(seed);
  const mask = new Uint8Array(siteCount);
  for (let i = 0; i < siteCount; i++) mask[i] = random.uniform() < p ? 1 : 0;
  return mask;
}

describe('labelSuperfluidClusters on hand-made masks', () => {
  it('finds four clusters, none spanning, in a 4 x 5 open lattice', () => {
    // x\y 0 1 2 3 4
    //  0  1 1 0 0 1     cluster 0: (0,0) (0,1) (1,1)          size 3
    //  1  0 1 0 1 1     cluster 1: (0,4) (1,4) (1,3)          size 3
    //  2  0 0 0 0 0     cluster 2: (3,0)                      size 1
    //  3  1 0 1 1 1     cluster 3: (3,2) (3,3) (3,4)          size 3
    // Labels follow the C-order scan. Box = whole lattice x 0..3, y 0..4: no cluster
    // reaches both x = 0 and x = 3, nor both y = 0 and y = 4. Largest: label 0 (tie).
    const mask = maskFromRows(['11001', '01011', '00000', '10111']);
    const r = labelSuperfluidClusters(mask, { shape: [4, 5] });
    expect(r.count).toBe(4);
    expect(Array.from(r.sizes)).toEqual([3, 3, 1, 3]);
    expect(Array.from(r.labels)).toEqual([
      0, 0, -1, -1, 1, -1, 0, -1, 1, 1, -1, -1, -1, -1, -1, 2, -1, 3, 3, 3,
    ]);
    expect(r.largestLabel).toBe(0);
    expect(r.largestSize).toBe(3);
    expect(r.spans).toBe(false);
    expect(r.largestSpanningLabel).toBe(-1);
    expect(r.markedSites).toBe(10);
    expect(r.sitesInSpanningClusters).toBe(0);
  });

  it('detects a path that crosses the lattice along both axes', () => {
    // 1 0 0 0
    // 1 1 1 0      one cluster of 6 sites, x from 0 to 2 and y from 0 to 3: it touches
    // 0 0 1 1      all four faces, so it spans along axis 0 and axis 1 (bits 1 | 2 = 3).
    const r = labelSuperfluidClusters(maskFromRows(['1000', '1110', '0011']), { shape: [3, 4] });
    expect(r.count).toBe(1);
    expect(r.sizes[0]).toBe(6);
    expect(r.spanningAxes[0]).toBe(3);
    expect(r.spans).toBe(true);
  });

  it('measures spanning against the bounding box of the occupied cloud', () => {
    // 5 x 5 lattice, cloud = inner 3 x 3 block (x, y in 1..3). Superfluid: the row x = 2,
    // y = 1..3. It reaches y = 1 and y = 3, the faces of the cloud's box along y, so it
    // spans along axis 1; along x it covers only x = 2 of 1..3: no (bits = 2). With the
    // whole lattice as the box (no occupied mask) it spans along neither axis.
    const occupied = maskFromRows(['00000', '01110', '01110', '01110', '00000']);
    const mask = maskFromRows(['00000', '00000', '01110', '00000', '00000']);
    const inCloud = labelSuperfluidClusters(mask, { shape: [5, 5], occupied });
    expect(inCloud.spanningAxes[0]).toBe(2);
    expect(inCloud.spans).toBe(true);
    expect(labelSuperfluidClusters(mask, { shape: [5, 5] }).spans).toBe(false);
  });

  it('joins clusters across a periodic boundary, and spans only by wrapping around', () => {
    // Chain 1 1 0 0 1 1. Open: clusters {0,1} and {4,5}. Periodic: site 0 reaches 5
    // through the boundary, one cluster of 4 sites that does not close a loop, so it
    // does not wrap. A full ring of 6 wraps (spans along axis 0).
    const chain = Uint8Array.from([1, 1, 0, 0, 1, 1]);
    const open = labelSuperfluidClusters(chain, { shape: [6] });
    expect(Array.from(open.sizes)).toEqual([2, 2]);
    const ring = labelSuperfluidClusters(chain, { shape: [6], periodic: [true] });
    expect(Array.from(ring.sizes)).toEqual([4]);
    expect(Array.from(ring.labels)).toEqual([0, 0, -1, -1, 0, 0]);
    expect(ring.spans).toBe(false);
    const full = labelSuperfluidClusters(new Uint8Array(6).fill(1), { shape: [6], periodic: [true] });
    expect(full.spanningAxes[0]).toBe(1);
  });

  it('wraps along a periodic axis of a 2D lattice but not through a gap', () => {
    // 4 x 4, periodic along y only. Row x = 1 fully superfluid: it wraps along y (bit 2);
    // it covers only x = 1 of 0..3 along the open x axis. With a hole at (1,2) the
    // remaining 3 sites are one cluster via the boundary (y = 3 -> y = 0) with no loop.
    const row = maskFromRows(['0000', '1111', '0000', '0000']);
    const r = labelSuperfluidClusters(row, { shape: [4, 4], periodic: [false, true] });
    expect(r.spanningAxes[0]).toBe(2);
    const gap = maskFromRows(['0000', '1101', '0000', '0000']);
    const g = labelSuperfluidClusters(gap, { shape: [4, 4], periodic: [false, true] });
    expect(g.count).toBe(1);
    expect(g.sizes[0]).toBe(3);
    expect(g.spans).toBe(false);
    // A periodic axis of length 2: the two bonds between the sites close a loop.
    const two = labelSuperfluidClusters(Uint8Array.from([1, 1]), { shape: [2], periodic: [true] });
    expect(two.spanningAxes[0]).toBe(1);
  });

  it('handles 3D lines and ignores directions in which the cloud is one site thick', () => {
    // 3 x 3 x 3, sites (1,1,z) for z = 0..2: spans along axis 2 only (bit 4).
    const mask = new Uint8Array(27);
    for (let z = 0; z < 3; z++) mask[(1 * 3 + 1) * 3 + z] = 1;
    expect(labelSuperfluidClusters(mask, { shape: [3, 3, 3] }).spanningAxes[0]).toBe(4);
    // Cloud = plane z = 1 only; superfluid = the line x = 1 in that plane (y = 0..2).
    // Spans along y; the box is one site thick along z, which does not count.
    const occupied = new Uint8Array(27);
    const line = new Uint8Array(27);
    for (let x = 0; x < 3; x++) for (let y = 0; y < 3; y++) occupied[(x * 3 + y) * 3 + 1] = 1;
    for (let y = 0; y < 3; y++) line[(1 * 3 + y) * 3 + 1] = 1;
    expect(labelSuperfluidClusters(line, { shape: [3, 3, 3], occupied }).spanningAxes[0]).toBe(2);
  });

  it('gives every bond between marked sites one label, and sizes that add up', () => {
    // Consistency of a labelling on a random 3D mask, open along x, periodic along y, z.
    const shape = [20, 16, 12];
    const n = 20 * 16 * 12;
    const mask = randomMask(n, 0.35, 'clusters/consistency');
    const r = labelSuperfluidClusters(mask, { shape, periodic: [false, true, true] });
    const counted = new Array(r.count).fill(0);
    for (let s = 0; s < n; s++) {
      expect(r.labels[s] >= 0).toBe(mask[s] === 1);
      if (r.labels[s] >= 0) counted[r.labels[s]]++;
    }
    expect(counted).toEqual(Array.from(r.sizes));
    for (let x = 0; x < 20; x++) {
      for (let y = 0; y < 16; y++) {
        for (let z = 0; z < 12; z++) {
          const s = (x * 16 + y) * 12 + z;
          if (!mask[s]) continue;
          const neighbours = [
            x + 1 < 20 ? s + 16 * 12 : -1,
            ((x * 16 + ((y + 1) % 16)) * 12) + z,
            (x * 16 + y) * 12 + ((z + 1) % 12),
          ];
          for (const t of neighbours) if (t >= 0 && mask[t]) expect(r.labels[t]).toBe(r.labels[s]);
        }
      }
    }
  });

  it('names the parameter in its errors', () => {
    expect(() => labelSuperfluidClusters(new Uint8Array(5), { shape: [6] })).toThrow(/mask/);
    expect(() => labelSuperfluidClusters(new Uint8Array(6), { shape: [6, 0] })).toThrow(/shape\[1\]/);
    expect(() => labelSuperfluidClusters(new Uint8Array(6), { shape: [6], occupied: new Uint8Array(2) })).toThrow(/occupied/);
  });
});

describe('site percolation on a 128 x 128 square lattice (Newman & Ziff 2000: p_c = 0.5927)', () => {
  // Near p_c the spanning probability switches over a window of width ~ L^(-1/nu), with
  // nu = 4/3 for 2D percolation (exact, den Nijs 1979; recalled from memory):
  // 128^(-3/4) = 0.026. p = 0.45 and p = 0.75 lie more than 5 window widths away, so
  // the spanning probability is within about 1e-3 of 0 or 1; with 20 deterministic
  // seeds we require 0 and 20 spanning samples.
  const side = 128;
  const spanningCount = (p: number, samples: number, axisBit?: number): number => {
    let count = 0;
    for (let k = 0; k < samples; k++) {
      const mask = randomMask(side * side, p, `perc/${p}/${k}`);
      const r = labelSuperfluidClusters(mask, { shape: [side, side] });
      const spans = axisBit === undefined ? r.spans : r.spanningAxes.some((bits) => (bits & axisBit) !== 0);
      if (spans) count++;
    }
    return count;
  };

  it('almost never spans at p = 0.45 and almost always at p = 0.75', () => {
    expect(spanningCount(0.45, 20)).toBe(0);
    expect(spanningCount(0.75, 20)).toBe(20);
  });

  it('spans along a given axis about half of the time at p_c', () => {
    // At p_c the probability of crossing a square in one given direction tends to 1/2
    // (Cardy, J. Phys. A 25, L201 (1992), aspect ratio 1). 40 samples: binomial standard
    // deviation 0.079; accept 0.25..0.75 (more than 3 sigma).
    const fraction = spanningCount(0.5927, 40, 1) / 40;
    expect(fraction).toBeGreaterThan(0.25);
    expect(fraction).toBeLessThan(0.75);
  });
});

describe('classifySites', () => {
  // Eight sites of a chain (T = 0, disordered unless stated), energyScale U = 1:
  //  site  n      |phi|^2  U dn/dmu   expected
  //   0    0.0    0        0          empty (n < 0.01)
  //   1    0.5    0.2      0.8        superfluid
  //   2    1.0    0        0          Mott, filling 1
  //   3    0.98   0        0.01       Mott, filling 1 (within 0.05 of 1 and stiff)
  //   4    0.7    1e-6     0.5        compressible, no condensate: Bose glass
  //   5    2.0    0        0          Mott, filling 2
  //   6    1.3    0.3      0.9        superfluid
  //   7    0.005  0        0.1        empty
  const density = Float64Array.from([0, 0.5, 1, 0.98, 0.7, 2, 1.3, 0.005]);
  const condensateDensity = Float64Array.from([0, 0.2, 0, 0, 1e-6, 0, 0.3, 0]);
  const compressibility = Float64Array.from([0, 0.8, 0, 0.01, 0.5, 0, 0.9, 0.1]);
  const base = { shape: [8], density, condensateDensity, compressibility, energyScale: 1 };

  it('classifies hand-made sites and reports fillings, counts and puddles', () => {
    const r = classifySites({ ...base, finiteTemperature: false, disordered: true });
    expect(Array.from(r.codes)).toEqual([
      PhaseCode.empty,
      PhaseCode.superfluid,
      PhaseCode.mott,
      PhaseCode.mott,
      PhaseCode.boseGlass,
      PhaseCode.mott,
      PhaseCode.superfluid,
      PhaseCode.empty,
    ]);
    expect(Array.from(r.mottFilling)).toEqual([0, 0, 1, 1, 0, 2, 0, 0]);
    expect(r.counts).toEqual({ empty: 2, superfluid: 2, mott: 3, boseGlass: 1, normalFluid: 0 });
    expect(r.mottSitesByFilling).toEqual([0, 2, 1]);
    // Cloud = sites 1..6; the superfluid sites 1 and 6 are two separate puddles, so
    // nothing spans sites 1 to 6 and both superfluid sites are puddle sites.
    expect(r.clusters.count).toBe(2);
    expect(r.superfluidSpans).toBe(false);
    expect(r.superfluidPuddleSites).toBe(2);
    expect(r.thresholds).toEqual(defaultPhaseThresholds);
  });

  it('calls the same sites normal fluid at T > 0, and superfluid in a clean T = 0 system', () => {
    const hot = classifySites({ ...base, finiteTemperature: true, disordered: true });
    expect(hot.codes[4]).toBe(PhaseCode.normalFluid);
    expect(hot.counts.normalFluid).toBe(1);
    const clean = classifySites({ ...base, finiteTemperature: false, disordered: false });
    expect(clean.codes[4]).toBe(PhaseCode.superfluid);
    expect(clean.superfluidBelowCondensateThreshold).toBe(1);
    expect(clean.compressibleWithoutCondensate).toBe('superfluid');
  });

  it('uses the caller thresholds and energy scale, and sums entropy per phase', () => {
    // Raising condensateMin to 0.25 turns site 1 (|phi|^2 = 0.2, compressible) into a
    // Bose glass site. energyScale 0.01 makes site 4 stiff (0.005 < 0.05), but n = 0.7 is
    // not near an integer, so it stays a Bose glass.
    const entropy = Float64Array.from([0, 0.1, 0.01, 0.02, 0.3, 0.04, 0.2, 0]);
    const r = classifySites({
      ...base,
      entropy,
      energyScale: 0.01,
      finiteTemperature: false,
      disordered: true,
      thresholds: { condensateMin: 0.25 },
    });
    expect(r.codes[1]).toBe(PhaseCode.boseGlass);
    expect(r.codes[4]).toBe(PhaseCode.boseGlass);
    expect(r.thresholds.condensateMin).toBe(0.25);
    expect(r.entropyByPhase?.boseGlass).toBeCloseTo(0.4, 12);
    expect(r.entropyByPhase?.mott).toBeCloseTo(0.07, 12);
    expect(() => classifySites({ ...base, finiteTemperature: false, disordered: true, thresholds: { integerTolerance: 0.6 } })).toThrow(/integerTolerance/);
    expect(() => classifySites({ ...base, energyScale: 0, finiteTemperature: false, disordered: true })).toThrow(/energyScale/);
  });

  it('finds a spanning superfluid between Bose-glass puddles on a 2D lattice', () => {
    // 5 x 5, all sites n = 1.2 and compressible; superfluid where the mask is 1, the rest
    // is Bose glass (T = 0, disordered). Row x = 2 crosses the cloud along y: spanning;
    // the single superfluid site at (0,0) is a puddle of 1 site.
    const sf = maskFromRows(['10000', '00000', '11111', '00000', '00000']);
    const n = 25;
    const r = classifySites({
      shape: [5, 5],
      density: new Float64Array(n).fill(1.2),
      condensateDensity: Float64Array.from(sf, (v) => (v ? 0.1 : 0)),
      compressibility: new Float64Array(n).fill(0.4),
      energyScale: 1,
      finiteTemperature: false,
      disordered: true,
    });
    expect(r.superfluidSpans).toBe(true);
    expect(r.superfluidPuddleSites).toBe(1);
    expect(r.counts.boseGlass).toBe(19);
  });

  it('matches the exact atomic limit at finite temperature (J = 0)', () => {
    // A single Bose-Hubbard site with J = 0 in the grand canonical ensemble:
    // E_m = U m(m-1)/2 - mu m, p_m ~ exp(-E_m/kT); n = <m>, dn/dmu = Var(m)/kT (exact).
    // At mu = U/2 (centre of the n = 1 plateau), U dn/dmu = 0.0225 at kT = 0.07 U (Mott)
    // and 0.133 at kT = 0.1 U (normal fluid), on either side of the default 0.05.
    const atomicSite = (muOverU: number, kTOverU: number): { n: number; kappaU: number } => {
      let z = 0;
      let m1 = 0;
      let m2 = 0;
      const energies = Array.from({ length: 12 }, (_, m) => (m * (m - 1)) / 2 - muOverU * m);
      const eMin = Math.min(...energies);
      energies.forEach((e, m) => {
        const w = Math.exp(-(e - eMin) / kTOverU);
        z += w;
        m1 += m * w;
        m2 += m * m * w;
      });
      const n = m1 / z;
      return { n, kappaU: (m2 / z - n * n) / kTOverU };
    };
    const sites = [atomicSite(0.5, 0.07), atomicSite(0.5, 0.1), atomicSite(0.05, 0.07)];
    const r = classifySites({
      shape: [3],
      density: Float64Array.from(sites, (s) => s.n),
      condensateDensity: new Float64Array(3),
      compressibility: Float64Array.from(sites, (s) => s.kappaU),
      energyScale: 1,
      finiteTemperature: true,
      disordered: false,
    });
    expect(sites[0].kappaU).toBeCloseTo(0.0225, 3);
    expect(sites[1].kappaU).toBeCloseTo(0.133, 3);
    // Site 3 sits near the lower plateau edge (mu = 0.05 U): holes are cheap, so it is a
    // compressible normal fluid at the same temperature as the Mott site 1.
    expect(Array.from(r.codes)).toEqual([PhaseCode.mott, PhaseCode.normalFluid, PhaseCode.normalFluid]);
  });
});
