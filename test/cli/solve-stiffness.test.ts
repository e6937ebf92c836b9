// `solve` with solver.stiffness on small periodic scenarios, end to end through the command
// line: summary.json results.superfluidFraction per axis, the report table and criterion.
// Reference for the clean case: in Gutzwiller mean field f_s = |phi|^2/n exactly on a clean
// uniform lattice (the twist makes J -> J cos q; Hellmann-Feynman), with phi and n from the
// homogeneous self-consistency (src/solver/homogeneous.ts, checked against the analytic lobe
// of van Oosten, van der Straten & Stoof, PRA 63, 053601 (2001)). An open axis carries no
// twist (a uniform twist is a pure gauge there): null with the reason.
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';
import { solveHomogeneous } from '../../src/solver/homogeneous.js';

async function solve(scenarioBody: Record<string, unknown>) {
  const dir = mkdtempSync(join(tmpdir(), 'tiercake-stiff-'));
  const scenario = join(dir, 's.json');
  writeFileSync(scenario, JSON.stringify(scenarioBody));
  const out = join(dir, 'out');
  const code = await runCli(['solve', scenario, '--out', out, '--quiet']);
  return {
    code,
    summary: JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')),
    report: readFileSync(join(out, 'report.html'), 'utf8'),
  };
}

describe('solve with solver.stiffness', () => {
  it('clean periodic lattice: f_s per axis = |phi|^2/n to 1e-6, in summary.json and the report', async () => {
    const { code, summary, report } = await solve({
      name: 'stiffness-clean',
      energyUnit: 'U',
      lattice: { shape: [8, 8], boundary: 'periodic' },
      hubbard: { hopping: 0.05 },
      particles: { chemicalPotential: 0.5 },
      solver: { compressibility: false, tolerance: 1e-11, stiffness: true },
    });
    expect(code).toBe(0);
    const sf = summary.results.superfluidFraction;
    const ref = solveHomogeneous({ zJ: 4 * 0.05, interactionU: 1, mu: 0.5, temperature: 0, nmax: summary.parameters.nmaxUsed });
    const expected = (ref.phi * ref.phi) / ref.density;
    expect(sf.perAxis).toHaveLength(2);
    for (const a of sf.perAxis) {
      expect(Math.abs(a.value - expected)).toBeLessThan(1e-6);
      expect(a.error).toBeLessThan(1e-3 * a.value);
      expect(a.reason).toBeNull();
      expect(a.converged).toBe(true);
    }
    expect(Math.abs(sf.condensateFraction - summary.results.condensateFraction)).toBeLessThan(1e-8);
    expect(sf.criterion).toContain('PRB 40, 546');
    expect(summary.warnings.map((w: { code: string }) => w.code)).not.toContain('stiffness-not-converged');
    expect(report).toContain('Superfluid stiffness (phase twist)');
    expect(report).toContain('superfluid fraction, axis x');
    expect(report).toContain('Fisher, Weichman, Grinstein &amp; Fisher');
  });

  it('mixed boundaries with box disorder: null with the reason on the open axis, a value on the periodic one; off by default', async () => {
    const base = {
      name: 'stiffness-mixed',
      energyUnit: 'U',
      lattice: { shape: [8, 6], boundary: ['periodic', 'open'] },
      hubbard: { hopping: 0.05 },
      disorder: { kind: 'box', width: 0.4, seed: 'e2e' },
      particles: { chemicalPotential: 0.5 },
      solver: { compressibility: false, tolerance: 1e-11 },
    };
    const on = await solve({ ...base, solver: { ...base.solver, stiffness: true } });
    expect(on.code).toBe(0);
    const [x, y] = on.summary.results.superfluidFraction.perAxis;
    expect(x.value).toBeGreaterThan(0.05);
    expect(x.value).toBeLessThan(1);
    expect(y.value).toBeNull();
    expect(y.reason).toMatch(/open axis/);
    expect(on.report).toContain('open axis: a uniform twist is a pure gauge there');
    const off = await solve(base);
    expect(off.summary.results.superfluidFraction).toBeNull();
    expect(off.report).not.toContain('Superfluid stiffness (phase twist)');
  });
});

describe('solve with solver.stiffness, curvature not converged', () => {
  it('a sweep budget too small for the twisted solves gives the warning stiffness-not-converged and NOT converged in the report', async () => {
    const { code, summary, report } = await solve({
      name: 'stiffness-short',
      energyUnit: 'U',
      lattice: { shape: [8, 8], boundary: 'periodic' },
      hubbard: { hopping: 0.05 },
      disorder: { kind: 'box', width: 0.4, seed: 'short' },
      particles: { chemicalPotential: 0.5 },
      solver: { compressibility: false, maxSweeps: 4, stiffness: true },
    });
    expect(code).toBe(3); // the main solve is short of its tolerance too
    const sf = summary.results.superfluidFraction;
    expect(sf.converged).toBe(false);
    expect(sf.perAxis.every((a: { converged: boolean }) => !a.converged)).toBe(true);
    const w = summary.warnings.find((x: { code: string }) => x.code === 'stiffness-not-converged');
    expect(w.message).toContain('solver.maxSweeps = 4');
    expect(report).toContain('NOT converged, see the warning');
  });
});

describe('the no-superflow warning (the site labels alone would call the puddles superfluid)', () => {
  it('strong box disorder at small J: condensate in puddles, f_s below 5 % of it, warned; a clean superfluid is not', async () => {
    // Outside reference: the clean lattice has f_s = |phi|^2/n (mean-field identity, above),
    // so the ratio is 1 there; under strong disorder the Bose glass carries no superflow
    // (Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989)).
    const { prepareScenario } = await import('../../src/pipeline/prepareScenario.js');
    const { solveScenario } = await import('../../src/pipeline/solveScenario.js');
    const { solveWarnings } = await import('../../src/pipeline/runWarnings.js');
    const { mkdtempSync, writeFileSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const folder = mkdtempSync(join(tmpdir(), 'tiercake-no-superflow-'));
    const run = async (name: string, width: number, hopping: number) => {
      const path = join(folder, `${name}.json`);
      writeFileSync(
        path,
        JSON.stringify({
          name,
          energyUnit: 'U',
          lattice: { shape: [12, 12], boundary: 'periodic' },
          hubbard: { hopping },
          disorder: { kind: 'box', width, seed: 'puddles' },
          particles: { chemicalPotential: 0.5 },
          truncation: { nmax: 4 },
          solver: { stiffness: true, compressibility: false },
        }),
      );
      const a = await solveScenario(prepareScenario(path), { threads: 1 });
      return solveWarnings(a).map((w) => w.code);
    };
    const glass = await run('puddles', 2.0, 0.01); // condensate fraction 0.010, f_s below 1e-6 on both axes
    expect(glass).toContain('no-superflow');
    const clean = await run('clean', 0, 0.05);
    expect(clean).not.toContain('no-superflow');
  });
});
