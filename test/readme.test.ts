// The README stays true: its scenario reference is exactly what the schema generates, and
// the quick-start commands name files that exist.
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync } from 'node:fs';
import { configReferenceMarkdown } from '../src/scenario/configReference.js';

const readme = readFileSync(new URL('../README.md', import.meta.url), 'utf8');

describe('README', () => {
  it('has the generated scenario reference (run `npm run docs:keys` after changing the schema)', () => {
    const start = readme.indexOf('<!-- keys:start -->\n') + '<!-- keys:start -->\n'.length;
    const end = readme.indexOf('<!-- keys:end -->');
    expect(readme.slice(start, end)).toBe(configReferenceMarkdown());
  });
  it('quick start names a bundled scenario and the test command', () => {
    const quick = readme.slice(readme.indexOf('## Quick start'), readme.indexOf('## What it computes'));
    const scenario = /configs\/[\w.-]+\.json/.exec(quick)?.[0];
    expect(scenario).toBeDefined();
    expect(existsSync(new URL(`../${scenario}`, import.meta.url))).toBe(true);
    expect(quick).toContain('npm test');
  });
});

describe('bundled scenarios', () => {
  it('every file in configs/ is a valid scenario', async () => {
    const { readdirSync } = await import('node:fs');
    const { prepareScenario } = await import('../src/pipeline/prepareScenario.js');
    const dir = new URL('../configs/', import.meta.url);
    const files = readdirSync(dir).filter((f) => f.endsWith('.json'));
    expect(files.length).toBeGreaterThanOrEqual(4);
    for (const f of files) {
      const { scenario } = prepareScenario(new URL(f, dir).pathname, []);
      expect(scenario.name.length).toBeGreaterThan(0);
    }
  });
});

describe('README caution on mean field', () => {
  // Quantum Monte Carlo critical points of the n = 1 Mott transition:
  //   2D square lattice (U/J)c = 16.74: Capogrosso-Sansone, Soyler, Prokof'ev, Svistunov, PRA 77, 015602 (2008);
  //   3D simple cubic  (U/J)c = 29.34: Capogrosso-Sansone, Prokof'ev, Svistunov, PRB 75, 134302 (2007).
  const qmc = { 2: 16.74, 3: 29.34 } as const;

  it('states the direction the project computes: mean field needs a larger U/J, so it shrinks the Mott region', async () => {
    const { phaseMap } = await import('../src/solver/phaseMap.js');
    const map = phaseMap({ zJMax: 0.2, muMin: 0, muMax: 1, columns: 2, rows: 2, temperature: 0, nmax: 6, boundaryPoints: 100 });
    const tip = map.boundaries.find((b) => b.filling === 1)!;
    const caution = readme.slice(readme.indexOf('## Cautions'), readme.indexOf('## Scenario reference'));
    for (const [dims, z] of [[2, 4], [3, 6]] as const) {
      const meanField = z / tip.tipZJ; // (U/J)c = z / (zJ/U)c
      expect(meanField).toBeGreaterThan(qmc[dims]);
      // The numbers quoted in the README are the computed ones (to the digits shown) and the published ones.
      const shown = dims === 2 ? '23.31' : '34.97';
      expect(Math.abs(meanField - Number(shown))).toBeLessThan(0.005);
      expect(caution).toContain(shown);
      expect(caution).toContain(String(qmc[dims]));
    }
    expect(caution).toMatch(/shrinks the Mott insulator/);
    expect(caution).not.toMatch(/overestimates the Mott/);
    expect(caution).toContain('PRA 77, 015602 (2008)');
    expect(caution).toContain('PRB 75, 134302 (2007)');
  });
});
