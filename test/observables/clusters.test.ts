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
  //  site  n      |phi|^2  |phi|^2/n  expected
  //   0    0.0    0        -          empty (n < 0.01)
  //   1    0.5    0.2      0.4        superfluid
  //   2    1.0    0        0          Mott, filling 1
  //   3    0.98   0        0          Mott, filling 1 (within 0.05 of 1, no condensate)
  //   4    0.7    1e-6     1.4e-6     off-integer, no condensate: Bose glass
  //   5    2.0    0.03     0.015      Mott, filling 2 (a proximity-induced 1.5 %, below 2 %)
  //   6    1.3    0.3      0.23       superfluid
  //   7    0.005  0        -          empty
  const density = Float64Array.from([0, 0.5, 1, 0.98, 0.7, 2, 1.3, 0.005]);
  const condensateDensity = Float64Array.from([0, 0.2, 0, 0, 1e-6, 0.03, 0.3, 0]);
  const compressibility = Float64Array.from([0, 0.8, 0, 0.01, 0.5, 0.02, 0.9, 0.1]);
  const base = { shape: [8], density, condensateDensity, compressibility, energyScale: 1 };

  it('classifies hand-made sites and reports fillings, counts, shell coherence and the bulk', () => {
    const r = classifySites({ ...base, temperature: 0, disordered: true });
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
    // The proximity-induced condensate of site 5 is reported, not used to erase the shell.
    const shell2 = r.shellStatistics.find((s) => s.filling === 2)!;
    expect(shell2.sites).toBe(1);
    expect(shell2.maxCondensateFraction).toBeCloseTo(0.015, 15);
    expect(shell2.coherentSites).toBe(1);
    // Bulk: density >= 0.1 x peak 2 = 0.2 gives sites 1..6, eroded by one site: 2..5.
    // The superfluid sites 1 and 6 lie on the rim, outside the bulk: nothing spans.
    expect(r.bulk.sites).toBe(4);
    expect(r.rimSuperfluidSites).toBe(2);
    expect(r.clusters.count).toBe(0);
    expect(r.superfluidSpans).toBe(false);
    expect(r.thresholds).toEqual(defaultPhaseThresholds);
    expect(r.fluctuationMeasure).toBe('none');
  });

  it('calls the off-integer site normal fluid at T > 0, and superfluid in a clean T = 0 system', () => {
    const hot = classifySites({ ...base, temperature: 0.05, disordered: true });
    expect(hot.codes[4]).toBe(PhaseCode.normalFluid);
    expect(hot.counts.normalFluid).toBe(1);
    const clean = classifySites({ ...base, temperature: 0, disordered: false });
    expect(clean.codes[4]).toBe(PhaseCode.superfluid);
    expect(clean.superfluidBelowCondensateThreshold).toBe(1);
    expect(clean.compressibleWithoutCondensate).toBe('superfluid');
  });

  it('uses the caller thresholds, and sums entropy per phase', () => {
    // condensateFractionMax 0.5 turns site 1 (fraction 0.4) into a Bose-glass site and
    // leaves site 6 (0.23) too; condensateMin 0.04 alone would not touch site 5 (fraction
    // 1.5 %, already Mott).
    const entropy = Float64Array.from([0, 0.1, 0.01, 0.02, 0.3, 0.04, 0.2, 0]);
    const r = classifySites({
      ...base,
      entropy,
      temperature: 0,
      disordered: true,
      thresholds: { condensateFractionMax: 0.5 },
    });
    expect(r.codes[1]).toBe(PhaseCode.boseGlass);
    expect(r.codes[6]).toBe(PhaseCode.boseGlass);
    expect(r.thresholds.condensateFractionMax).toBe(0.5);
    expect(r.entropyByPhase?.boseGlass).toBeCloseTo(0.6, 12);
    expect(r.entropyByPhase?.mott).toBeCloseTo(0.07, 12);
    // A stricter coherence threshold erases nothing the density says is a plateau...
    const strict = classifySites({ ...base, temperature: 0, disordered: true, thresholds: { condensateFractionMax: 0.01 } });
    // ...except where the site's own condensate is above it: site 5 (1.5 %) becomes superfluid.
    expect(strict.codes[5]).toBe(PhaseCode.superfluid);
    expect(() => classifySites({ ...base, temperature: 0, disordered: true, thresholds: { integerTolerance: 0.6 } })).toThrow(/integerTolerance/);
    expect(() => classifySites({ ...base, energyScale: 0, temperature: 0, disordered: true })).toThrow(/energyScale/);
    expect(() => classifySites({ ...base, temperature: -1, disordered: true })).toThrow(/temperature/);
  });

  it('finds a spanning superfluid between Bose-glass puddles on a 2D lattice, tested on the eroded bulk', () => {
    // 7 x 7, all sites n = 1.2 and compressible; superfluid where the mask is 1, the rest
    // is Bose glass (T = 0, disordered). Bulk = the 5 x 5 interior (one layer eroded at the
    // open faces). Row x = 3 crosses the bulk along y: spanning. The superfluid site
    // (1,1) inside the bulk is a puddle of 1; the rim row x = 0, all superfluid, is outside
    // the bulk and does not count.
    const sf = maskFromRows(['1111111', '0100000', '0000000', '1111111', '0000000', '0000000', '0000000']);
    const n = 49;
    const r = classifySites({
      shape: [7, 7],
      density: new Float64Array(n).fill(1.2),
      condensateDensity: Float64Array.from(sf, (v) => (v ? 0.1 : 0)),
      compressibility: new Float64Array(n).fill(0.4),
      energyScale: 1,
      temperature: 0,
      disordered: true,
    });
    expect(r.bulk.sites).toBe(25);
    expect(r.superfluidSpans).toBe(true);
    expect(r.superfluidPuddleSites).toBe(1);
    expect(r.rimSuperfluidSites).toBe(7 + 2);
    expect(r.counts.boseGlass).toBe(49 - 7 - 1 - 7);
  });

  it('a superfluid that connects the sides only through a one-site rim does not span', () => {
    // A 9 x 9 cloud: bulk interior of puddles, and a superfluid border ring (the dilute rim).
    // Counted as cloud, the ring touches all four faces; on the bulk, nothing spans.
    const rows = Array.from({ length: 9 }, (_, x) =>
      Array.from({ length: 9 }, (_, y) => (x === 0 || y === 0 || x === 8 || y === 8 || (x === 4 && y === 4) ? '1' : '0')).join(''),
    );
    const sf = maskFromRows(rows);
    const r = classifySites({
      shape: [9, 9],
      density: new Float64Array(81).fill(0.8),
      condensateDensity: Float64Array.from(sf, (v) => (v ? 0.1 : 0)),
      compressibility: new Float64Array(81).fill(0.4),
      energyScale: 1,
      temperature: 0,
      disordered: true,
    });
    expect(r.superfluidSpans).toBe(false);
    expect(r.rimSuperfluidSites).toBe(32);
    expect(r.superfluidPuddleSites).toBe(1);
  });
});

describe('superfluid rings and shells around the trap centre', () => {
  const ringRows = (gap: boolean, diagonal: boolean) =>
    Array.from({ length: 11 }, (_, x) =>
      Array.from({ length: 11 }, (_, y) => {
        const onRing = Math.max(Math.abs(x - 5), Math.abs(y - 5)) === 3;
        if (gap && x === 2 && y === 5) return '0';
        // Without its corner (2, 2) the ring closes only across the diagonal (2, 3)-(3, 2):
        // no nearest-neighbour bond, so it is one open chain.
        if (diagonal && x === 2 && y === 2) return '0';
        return onRing ? '1' : '0';
      }).join(''),
    );

  function classifyRing(rows: string[]) {
    const sf = maskFromRows(rows);
    return classifySites({
      shape: [11, 11],
      density: new Float64Array(121).fill(1.5),
      condensateDensity: Float64Array.from(sf, (v) => (v ? 0.2 : 0)),
      compressibility: new Float64Array(121).fill(0.4),
      energyScale: 1,
      temperature: 0,
      disordered: true,
      centre: [5, 5],
    });
  }

  it('a closed ring of superfluid around the centre spans (a global superfluid between shells)', () => {
    const r = classifyRing(ringRows(false, false));
    expect(r.enclosingClusters).toBe(1);
    expect(r.superfluidSpans).toBe(true);
    expect(r.superfluidPuddleSites).toBe(0);
  });

  it('a ring broken by one site, or closed only across a diagonal, is a puddle', () => {
    for (const rows of [ringRows(true, false), ringRows(false, true)]) {
      const r = classifyRing(rows);
      expect(r.enclosingClusters).toBe(0);
      expect(r.superfluidSpans).toBe(false);
      expect(r.superfluidPuddleSites).toBe(r.counts.superfluid);
    }
  });

  it('a spherical shell of superfluid encloses the centre of a 3D cloud; a central core does not count as enclosing', () => {
    const n = 9;
    const shellMask = new Float64Array(n ** 3);
    const core = new Float64Array(n ** 3);
    for (let i = 0; i < n ** 3; i++) {
      const x = Math.floor(i / 81) - 4;
      const y = (Math.floor(i / 9) % 9) - 4;
      const z = (i % 9) - 4;
      const cheb = Math.max(Math.abs(x), Math.abs(y), Math.abs(z));
      shellMask[i] = cheb === 2 ? 0.2 : 0;
      core[i] = cheb <= 1 ? 0.2 : 0;
    }
    const common = {
      shape: [n, n, n],
      density: new Float64Array(n ** 3).fill(1.5),
      compressibility: new Float64Array(n ** 3).fill(0.4),
      energyScale: 1,
      temperature: 0,
      disordered: true,
    };
    const withShell = classifySites({ ...common, condensateDensity: shellMask });
    expect(withShell.enclosingClusters).toBe(1);
    expect(withShell.superfluidSpans).toBe(true);
    const withCore = classifySites({ ...common, condensateDensity: core });
    expect(withCore.enclosingClusters).toBe(0);
    expect(withCore.superfluidSpans).toBe(false);
  });
});
