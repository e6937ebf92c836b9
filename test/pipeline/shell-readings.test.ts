// Shells and phases read off full solves agree with the density, in 2D and 3D, at T = 0 and
// cold T > 0 (issue 13 "Phases and shells", issue 22 "Shells at ordinary temperatures").
//
// References outside the labelling code:
// - the radial density profile of the same solve (bin means of n and |phi|^2), read the way
//   a physicist reads a plateau, and the numbers measured on it by an independent audit
//   (rb-layer-lab: density 2.000 out to 4.0 µm, 1.00 from 8.3 µm; at entropy 0.3 per atom:
//   376 sites with |n - 1| < 0.05 and P(odd) 0.95-0.99);
// - in 3D at small J/U (zJ = 0.03 U, deep in the lobes) the atomic-limit wedding cake:
//   filling k lies where U (k - 1) < mu - V r^2 < U k at T = 0, so its edges are at
//   r = sqrt((mu - U (k - 1))/V) (shifted by ~0.1 site by the hopping), and at kT = 0.1 U,
//   where the superfluid has melted (phi = 0), the edges are where the exact thermal
//   atomic-limit density (computed here) leaves k +- 0.05.

import { mkdtempSync, rmSync, writeFileSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { solveScenario, type SolveArtifacts } from '../../src/pipeline/solveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-shells-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const labLayer = JSON.parse(readFileSync(new URL('../../configs/rb-layer-lab.json', import.meta.url), 'utf8')) as Record<string, any>;

function scenario(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ ...body, name }));
  return path;
}

async function solve(path: string): Promise<SolveArtifacts> {
  return solveScenario(prepareScenario(path, []), { threads: 1 });
}

/** Bin mean radius (µm or sites), density and condensate fraction of the radial profile. */
function profileRows(a: SolveArtifacts): { r: number; n: number; f: number }[] {
  const p = a.profile;
  const scale = a.resolved.latticeSpacingUm ?? 1;
  const rows: { r: number; n: number; f: number }[] = [];
  for (let b = 0; b < p.count.length; b++) {
    if (p.count[b] === 0) continue;
    const n = p.fields.density.mean[b];
    rows.push({ r: p.meanRadius[b] * scale, n, f: p.fields.condensateDensity.mean[b] / n });
  }
  return rows;
}

function shell(a: SolveArtifacts, filling: number) {
  const s = a.shells.shells.find((x) => x.filling === filling);
  expect(s, `shell n = ${filling}`).toBeDefined();
  const scale = a.resolved.latticeSpacingUm ?? 1;
  return { ...s!, inner: s!.innerRadius * scale, outer: s!.outerRadius * scale };
}

/** Sites with |n - k| <= 0.05 and |phi|^2/n <= 2 %: the plateau as the density shows it. */
function plateauSites(a: SolveArtifacts, k: number): number {
  const { density, condensateDensity } = a.fields;
  let count = 0;
  for (let i = 0; i < density.length; i++) {
    if (Math.abs(density[i] - k) <= 0.05 && condensateDensity[i] <= 0.02 * density[i]) count++;
  }
  return count;
}

function mottSites(a: SolveArtifacts, k: number): number {
  return a.classification.mottSitesByFilling[k] ?? 0;
}

describe('2D Rb layer (rb-layer-lab, T = 1 nK)', async () => {
  const a = await solve(scenario('lab-layer', labLayer));
  const rows = profileRows(a);

  it('n = 2 shell: central (inner radius 0) and out to the edge of the 2.000 plateau', () => {
    const s = shell(a, 2);
    expect(s.innerRadius).toBe(0);
    // Plateau as read from the profile: last bin with n = 2.000 (to 2e-3) ...
    const flat = rows.filter((row) => Math.abs(row.n - 2) < 2e-3).at(-1)!;
    // ... and the first bin beyond it whose mean condensate fraction exceeds 2 %.
    const coherent = rows.find((row) => row.r > flat.r && row.f > 0.02)!;
    expect(flat.r).toBeGreaterThan(3.9); // the audit: 2.000 out to 4.0 µm
    expect(s.outer).toBeGreaterThanOrEqual(flat.r);
    expect(s.outer).toBeLessThanOrEqual(coherent.r);
  });

  it('n = 1 shell starts where the density is 1.00 (from 8.3 µm)', () => {
    const s = shell(a, 1);
    const outerTwo = shell(a, 2).outer;
    const flat = rows.find((row) => row.r > outerTwo && Math.abs(row.n - 1) < 2e-3)!;
    const coherent = rows.filter((row) => row.r < flat.r && row.f > 0.02).at(-1)!;
    expect(flat.r).toBeGreaterThan(8.0);
    expect(flat.r).toBeLessThan(8.6);
    expect(s.inner).toBeLessThanOrEqual(flat.r);
    expect(s.inner).toBeGreaterThanOrEqual(coherent.r);
  });

  it('labels every plateau site of the density Mott, reports their proximity coherence, and an LDA label', () => {
    for (const k of [1, 2]) expect(mottSites(a, k)).toBe(plateauSites(a, k));
    const stats = a.classification.shellStatistics;
    expect(stats.map((s) => s.filling)).toEqual([1, 2]);
    for (const s of stats) {
      expect(s.maxCondensateFraction).toBeLessThanOrEqual(0.02);
      expect(s.coherentSites).toBeGreaterThan(0); // an absolute |phi|^2 > 1e-4 rule would have erased these
    }
    const lda = a.classification.localDensity!;
    expect(lda.codes.length).toBe(a.fields.density.length);
    expect(lda.comparison.agree + lda.comparison.disagree).toBe(a.fields.density.length);
  });
});

describe('2D Rb layer 72 x 72 at 14.5 E_r, T = 0, 2600 atoms', async () => {
  const body = structuredClone(labLayer);
  body.lattice.shape = [72, 72];
  body.laboratory.depthEr = 14.5;
  body.particles.atoms = 2600;
  body.temperature = { kT: 0 };
  const a = await solve(scenario('layer-72', body));

  it('the n = 1 plateau is a Mott shell, not superfluid', () => {
    const plateau = plateauSites(a, 1);
    expect(plateau).toBeGreaterThan(200);
    expect(mottSites(a, 1)).toBe(plateau);
    const s = shell(a, 1);
    expect(s.radiusFrom).toBe('annulus');
    // Between the central superfluid and the rim: the shell's edges bracket its plateau bins.
    const inPlateau = profileRows(a).filter((row) => Math.abs(row.n - 1) <= 0.05 && row.f <= 0.02);
    expect(inPlateau.length).toBeGreaterThan(0);
    for (const row of inPlateau) {
      expect(row.r).toBeGreaterThanOrEqual(s.inner - 0.54);
      expect(row.r).toBeLessThanOrEqual(s.outer + 0.54);
    }
  });

  it('the central superfluid is cut off by the shell and the one-site rim does not make it span', () => {
    const c = a.classification;
    expect(c.counts.superfluid).toBeGreaterThan(1000);
    expect(c.superfluidSpans).toBe(false);
    expect(c.rimSuperfluidSites).toBeGreaterThan(0);
  });
});

describe('2D Rb layer at entropy 0.3 per atom (kT ~ 0.1 U)', async () => {
  const body = structuredClone(labLayer);
  body.temperature = { entropyPerAtom: 0.3 };
  const a = await solve(scenario('layer-entropy', body));
  const U = a.resolved.units.interaction;

  it('finds the n = 1 and n = 2 shells of the density plateaus (376 sites, P(odd) 0.95-0.99)', () => {
    expect(a.outcome.temperature / U).toBeGreaterThan(0.09);
    expect(a.outcome.temperature / U).toBeLessThan(0.1);
    const { density, parityOdd } = a.fields;
    let plateau = 0;
    for (let i = 0; i < density.length; i++) if (Math.abs(density[i] - 1) < 0.05) plateau++;
    expect(Math.abs(plateau - 376)).toBeLessThanOrEqual(4);
    expect(mottSites(a, 1)).toBe(plateau);
    expect(mottSites(a, 2)).toBe(plateauSites(a, 2));
    for (let i = 0; i < density.length; i++) {
      if (a.classification.mottFilling[i] !== 1) continue;
      expect(parityOdd[i]).toBeGreaterThanOrEqual(0.95);
      expect(parityOdd[i]).toBeLessThanOrEqual(0.99);
    }
    const s1 = a.classification.shellStatistics.find((s) => s.filling === 1)!;
    expect(a.classification.fluctuationMeasure).toBe('compressibility');
    expect(s1.maxFluctuationRatio!).toBeLessThan(0.5);
    // Parity contrast against the thermal atomic-limit expectation at the same kT: the
    // plateau centre is the most contrasted point of the shell.
    expect(s1.meanParityOdd!).toBeLessThanOrEqual(s1.atomicReference.parityOdd);
    // Without a condensate every site is the exact atomic-limit site at its own mu - eps_i
    // (computed here): P(odd) to 1e-8.
    const kT = a.outcome.temperature / U;
    for (let i = 0; i < density.length; i++) {
      if (a.classification.mottFilling[i] !== 1) continue;
      const muLoc = (a.outcome.solve.mu - a.fields.sitePotential[i]) / U;
      let z = 0;
      let odd = 0;
      for (let m = 0; m <= 10; m++) {
        const w = Math.exp(-((m * (m - 1)) / 2 - muLoc * m) / kT);
        z += w;
        if (m % 2 === 1) odd += w;
      }
      expect(Math.abs(parityOdd[i] - odd / z)).toBeLessThan(1e-8);
    }
  });

  it('no condensate anywhere, so the lattice is the atomic limit site by site: the LDA shells are the same', () => {
    expect(a.classification.counts.superfluid).toBe(0);
    const lda = a.classification.localDensity!;
    expect(lda.comparison.mottSitesByFilling.lda).toEqual(a.classification.mottSitesByFilling);
  });
});

describe('3D cloud at small J (zJ = 0.03 U)', () => {
  const V = 0.02;
  const mu = 1.6;
  const body = {
    energyUnit: 'U',
    lattice: { shape: [22, 22, 22] },
    hubbard: { hopping: 0.005 },
    trap: { coefficient: V },
    particles: { chemicalPotential: mu },
    truncation: { nmax: 5 },
  };

  it('T = 0: shells n = 1, 2 at the atomic-limit wedding-cake radii (to 0.6 site), the central one from 0', async () => {
    const a = await solve(scenario('cube-cold', { ...body, temperature: { kT: 0 } }));
    const edge = (k: number) => Math.sqrt((mu - (k - 1)) / V);
    const one = shell(a, 1);
    const two = shell(a, 2);
    expect(Math.abs(one.outer - edge(1))).toBeLessThan(0.6);
    expect(Math.abs(one.inner - edge(2))).toBeLessThan(0.6);
    expect(Math.abs(two.outer - edge(2))).toBeLessThan(0.6);
    expect(two.innerRadius).toBe(0);
    for (const k of [1, 2]) expect(mottSites(a, k)).toBe(plateauSites(a, k));
  });

  it('kT = 0.1 U: shells where the exact thermal atomic density is within 0.05 of the filling', async () => {
    const kT = 0.1;
    const a = await solve(scenario('cube-warm', { ...body, temperature: { kT } }));
    expect(a.classification.counts.superfluid).toBe(0);
    const atomicDensity = (muLoc: number): number => {
      let z = 0;
      let m1 = 0;
      for (let m = 0; m <= 12; m++) {
        const w = Math.exp(-((m * (m - 1)) / 2 - muLoc * m) / kT);
        z += w;
        m1 += m * w;
      }
      return m1 / z;
    };
    // Edge of the plateau k on the mu_loc axis, where |n - k| = 0.05, by bisection.
    const muEdge = (target: number, lo: number, hi: number): number => {
      for (let it = 0; it < 80; it++) {
        const mid = 0.5 * (lo + hi);
        if (atomicDensity(mid) < target) lo = mid;
        else hi = mid;
      }
      return 0.5 * (lo + hi);
    };
    const radius = (muLoc: number) => Math.sqrt((mu - muLoc) / V);
    const one = shell(a, 1);
    const two = shell(a, 2);
    expect(Math.abs(one.outer - radius(muEdge(0.95, 0, 0.5)))).toBeLessThan(0.6);
    expect(Math.abs(one.inner - radius(muEdge(1.05, 0.5, 1)))).toBeLessThan(0.6);
    expect(Math.abs(two.outer - radius(muEdge(1.95, 1, 1.5)))).toBeLessThan(0.6);
    expect(two.innerRadius).toBe(0);
    for (let i = 0; i < a.fields.density.length; i++) {
      const n = a.fields.density[i];
      const k = Math.round(n);
      const expected = n < 0.01 ? PhaseCode.empty : k >= 1 && Math.abs(n - k) <= 0.05 ? PhaseCode.mott : PhaseCode.normalFluid;
      if (a.classification.codes[i] !== expected) throw new Error(`site ${i}: n = ${n}, code ${a.classification.codes[i]}, expected ${expected}`);
    }
  });
});
