// Disordered lattices, end to end through the scenario route:
// - J = 0 with box disorder of width W < U: incompressible (every site at n = 1, dN/dmu = 0)
//   exactly for W/2 < mu < U - W/2 and compressible for the rest of 0 < mu < U; for W > U
//   compressible at every mu > 0, so no Mott gap survives and a compressible insulator
//   separates Mott and superfluid, as the theorem of inclusions requires (Pollet, Prokof'ev,
//   Svistunov & Troyer, PRL 103, 140402 (2009); Fisher et al., PRB 40, 546 (1989)).
// - weak disorder deep in a Mott lobe leaves it incompressible; strong disorder at small J
//   gives compressible regions and superfluid puddles that do not span the lattice (the
//   mean-field Bose glass of Buonsante, Penna, Vezzani & Blakie, PRA 76, 011602 (2007)).
import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-disorder-'));

function scenarioFile(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', lattice: { shape: [128, 128], boundary: 'periodic' }, ...body }));
  return path;
}

async function compressibilityAt(hopping: number, width: number, mu: number) {
  const path = scenarioFile(`box-${hopping}-${width}-${mu}`, {
    hubbard: { hopping: hopping > 0 ? hopping : 1e-300 },
    particles: { chemicalPotential: mu },
    disorder: { kind: 'box', width, seed: 'inclusions' },
    truncation: { nmax: 5 },
  });
  const a = await solveScenario(prepareScenario(path, []), { threads: 1 });
  let dNdmu = 0;
  for (const k of a.fields.compressibility) dNdmu += k;
  return { a, dNdmu };
}

describe('box disorder at J = 0 (atomic limit, exact)', () => {
  it('W < U: incompressible exactly for W/2 < mu < U - W/2, compressible elsewhere in (0, U)', async () => {
    const W = 0.6;
    for (const mu of [0.32, 0.5, 0.68]) {
      const { a, dNdmu } = await compressibilityAt(0, W, mu);
      expect(dNdmu).toBe(0);
      expect(a.fields.density.every((n) => n === 1)).toBe(true);
    }
    for (const mu of [0.05, 0.2, 0.8, 0.95]) {
      const { dNdmu } = await compressibilityAt(0, W, mu);
      expect(dNdmu).toBeGreaterThan(0);
    }
  });

  it('W > U: compressible at every mu > 0 (no Mott gap survives)', async () => {
    for (const mu of [0.1, 0.5, 0.9, 1.3, 2.2]) {
      const { dNdmu } = await compressibilityAt(0, 1.4, mu);
      expect(dNdmu).toBeGreaterThan(0);
    }
  });
});

describe('disorder at small hopping (mean field)', () => {
  it('weak disorder deep in the n = 1 lobe: still an incompressible Mott insulator', async () => {
    const { a, dNdmu } = await compressibilityAt(0.01, 0.2, 0.5); // zJ/U = 0.04, lobe edge at 0.17
    expect(Math.abs(dNdmu)).toBeLessThan(1e-6);
    expect(a.classification.counts.mott).toBe(128 * 128);
  });

  it('strong disorder at small J: compressible, superfluid puddles that do not span', async () => {
    const { a, dNdmu } = await compressibilityAt(0.005, 1.6, 0.5);
    expect(dNdmu).toBeGreaterThan(0);
    const c = a.classification;
    expect(c.counts.boseGlass + c.counts.superfluid).toBeGreaterThan(0);
    expect(c.clusters.count).toBeGreaterThan(1);
    expect(c.superfluidSpans).toBe(false);
    expect(c.codes.some((x) => x === PhaseCode.boseGlass || x === PhaseCode.superfluid)).toBe(true);
  });
});
