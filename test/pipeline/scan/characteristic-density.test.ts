// The characteristic density as a scan axis, and the collapse it stands for (Rigol,
// Batrouni, Rousseau, Scalettar, PRA 79, 053605 (2009)): at fixed U/J, trapped clouds with
// the same rho~ = N (V/J)^(d/2) have the same state in the trap, the same central density
// and the same phases at the same radius in units of the characteristic length
// zeta = sqrt(J/V), whatever N and V are separately.
//
// Three scans of rho~ = 20 ... 300 on a 2D layer at U/J = 50 (zJ/U = 0.08, inside the
// n = 1 lobe, so the centre runs through superfluid n < 1, the n = 1 Mott plateau, the
// superfluid between fillings and the n = 2 plateau):
//   A: trap V = 0.002 U held, the atom number follows (N = 10 rho~), zeta = 3.16 sites;
//   B: trap V = 0.001 U held, N = 20 rho~, zeta = 4.47 sites;
//   C: N = 2000 held, the trap follows (V = J rho~ / N), zeta from 10 down to 2.6 sites.
// Tolerances: central density 0.01 atoms per site (the scaling is exact in the local-
// density limit; the lattice adds gradient corrections of order 1/zeta); central phase
// identical; shell radii (in units of zeta) within one site of each scan, 1/zeta_1 +
// 1/zeta_2 (a shell edge is resolved to about one site: common practice). At a grid point
// next to a plateau edge of the curve (the central phase changes to a neighbouring point)
// the corrections shift the onset: there the density may differ by what a 3 % shift of
// rho~ makes (measured: a 1.5 % shift at rho~ = 132 between zeta = 3.2 and 4.5) and the
// phase may be the neighbour's. Control: at equal N instead of equal rho~ the central density of the two
// traps differs by far more than the tolerance, so the check can fail.
import { afterAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runScanCommand } from '../../../src/cli/commands/scan.js';
import { prepareScenario } from '../../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../../src/pipeline/solveScenario.js';
import { scanRowOf } from '../../../src/pipeline/scan/scanRow.js';
import { InputError } from '../../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-collapse-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const scenario = join(dir, 'collapse.json');
writeFileSync(
  scenario,
  JSON.stringify({
    name: 'collapse',
    energyUnit: 'U',
    lattice: { shape: [72, 72] },
    hubbard: { hopping: 0.02 },
    trap: { coefficient: 0.002 },
    particles: { atoms: 1000 },
    truncation: { nmax: 5 },
  }),
);

async function scan(out: string, args: Record<string, string | string[]>): Promise<Array<Record<string, number>>> {
  const mute = [vi.spyOn(process.stdout, 'write').mockImplementation(() => true), vi.spyOn(process.stderr, 'write').mockImplementation(() => true)];
  try {
    expect(await runScanCommand(scenario, { threads: '1', quiet: true, out: join(dir, out), vary: ['characteristicDensity=20:300:8'], ...args })).toBe(0);
  } finally {
    for (const m of mute) m.mockRestore();
  }
  const lines = readFileSync(join(dir, out, 'scan.csv'), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  return lines.slice(1).map((l) => Object.fromEntries(l.split(',').map((v, k) => [header[k], v === 'nan' ? NaN : Number(v)])));
}

describe('characteristic density', () => {
  it('scans of trap strength and of atom number at equal rho~ collapse onto one curve of central density and phases', async () => {
    const a = await scan('A', { fixed: 'trap' });
    const b = await scan('B', { fixed: 'trap', set: ['trap.coefficient=0.001', 'lattice.shape=[96,96]'] });
    const c = await scan('C', { fixed: 'atoms', set: ['particles.atoms=2000', 'lattice.shape=[90,90]'] });
    const rho = [20, 60, 100, 140, 180, 220, 260, 300];
    for (const [rows, label] of [[a, 'A'], [b, 'B'], [c, 'C']] as const) {
      expect(rows.map((r) => r.characteristicDensity), label).toEqual(rho);
      for (const r of rows) expect(Math.abs(r.characteristic_density - r.characteristicDensity) / r.characteristicDensity, label).toBeLessThan(2e-6);
    }
    // The scans really vary different things: N follows in A and B, the trap in C.
    expect(a.map((r) => Math.round(r.atoms))).toEqual(rho.map((x) => 10 * x));
    expect(b.map((r) => Math.round(r.atoms))).toEqual(rho.map((x) => 20 * x));
    expect(c.every((r) => Math.abs(r.atoms - 2000) < 0.01)).toBe(true);
    expect(c[0].characteristic_length).toBeCloseTo(10, 9);
    expect(c[7].characteristic_length).toBeCloseTo(Math.sqrt(2000 / 300), 9);
    // The centre passes through superfluid, the n = 1 plateau and the n = 2 plateau.
    expect(a.map((r) => r.central_phase)).toContain(1);
    expect(a.map((r) => Math.round(r.central_density * 100) / 100)).toContain(1);
    expect(a[7].central_density).toBeCloseTo(2, 2);

    // Where the curve is steep (the centre leaving a plateau) a small shift of rho~ by the
    // lattice corrections is a large change of density: there the tolerance grows by the
    // change a 3 % shift of rho~ makes (the local slope from the scans' own neighbours),
    // and the central phase may be that of a neighbouring grid point.
    const slope = (rows: Array<Record<string, number>>, k: number): number =>
      Math.max(
        k > 0 ? Math.abs(rows[k].central_density - rows[k - 1].central_density) / (rho[k] - rho[k - 1]) : 0,
        k < rho.length - 1 ? Math.abs(rows[k + 1].central_density - rows[k].central_density) / (rho[k + 1] - rho[k]) : 0,
      );
    let worstDensity = 0;
    let worstRadius = 0;
    let edgePoints = 0;
    for (const other of [b, c]) {
      for (let k = 0; k < rho.length; k++) {
        const p = a[k];
        const q = other[k];
        const diff = Math.abs(p.central_density - q.central_density);
        if (q.central_phase !== p.central_phase || diff >= 0.01) {
          // only next to a phase change of the curve, within a 3 % shift of rho~
          const neighbours = [a[k - 1], a[k + 1]].filter((r) => r !== undefined).map((r) => r.central_phase);
          expect(neighbours.some((ph) => ph !== p.central_phase), `rho~ = ${rho[k]}: differs away from a plateau edge`).toBe(true);
          expect([p.central_phase, ...neighbours], `rho~ = ${rho[k]}`).toContain(q.central_phase);
          expect(diff, `rho~ = ${rho[k]}`).toBeLessThan(0.01 + 0.03 * rho[k] * Math.max(slope(a, k), slope(other, k)));
          edgePoints++;
          continue;
        }
        worstDensity = Math.max(worstDensity, diff);
        for (const edge of ['shell_1_outer_radius', 'shell_1_inner_radius', 'shell_2_outer_radius']) {
          const x = p[edge] / p.characteristic_length;
          const y = q[edge] / q.characteristic_length;
          expect(Number.isNaN(x), `${edge} at rho~ = ${rho[k]}`).toBe(Number.isNaN(y));
          if (Number.isNaN(x)) continue;
          const radiusTolerance = 1 / p.characteristic_length + 1 / q.characteristic_length;
          worstRadius = Math.max(worstRadius, Math.abs(x - y) / radiusTolerance);
          expect(Math.abs(x - y), `${edge} at rho~ = ${rho[k]}`).toBeLessThan(radiusTolerance);
        }
      }
    }
    expect(edgePoints).toBeLessThanOrEqual(2); // 14 of the 16 comparisons at least are strict
    expect(worstDensity).toBeGreaterThan(0); // really compared different lattices
    process.stdout.write(
      `collapse: ${16 - edgePoints} of 16 comparisons strict: largest central-density difference ${worstDensity.toFixed(4)} atoms/site (tolerance 0.01), ` +
        `largest shell-radius difference ${(worstRadius * 100).toFixed(0)} % of its tolerance; ${edgePoints} at a plateau edge\n`,
    );

    // Control: the same atom number in trap B as at rho~ = 180 in trap A (N = 1800) is
    // rho~ = 90 there, and its centre is a different state.
    const prepared = prepareScenario(scenario, ['trap.coefficient=0.001', 'lattice.shape=[96,96]', 'particles={"atoms":1800}']);
    const control = scanRowOf(0, [0], await solveScenario(prepared, { threads: 1 }), false);
    expect(Math.abs(control.centralDensity - a[4].central_density)).toBeGreaterThan(0.1);
  });

  it('refuses what rho~ cannot describe', async () => {
    const refused = async (args: Record<string, string | string[]>, message: RegExp): Promise<void> => {
      await expect(runScanCommand(scenario, { threads: '1', quiet: true, out: join(dir, 'refused'), ...args })).rejects.toThrow(InputError);
      await expect(runScanCommand(scenario, { threads: '1', quiet: true, out: join(dir, 'refused'), ...args })).rejects.toThrow(message);
    };
    await refused({ vary: ['characteristicDensity=10,20'], set: ['trap.coefficient=[0.002, 0]'] }, /needs a harmonic trap on every lattice axis/);
    await refused({ vary: ['characteristicDensity=10,20'], fixed: 'atoms', set: ['particles={"chemicalPotential": 1}'] }, /--fixed atoms: the scenario gives a chemical potential/);
    await refused({ vary: ['characteristicDensity=10,20', 'particles.atoms=1,2'] }, /the atom number already follows rho~/);
    await refused({ vary: ['hubbard.hopping=0.01,0.02'], fixed: 'trap' }, /--fixed: only used with --vary characteristicDensity/);
  });
});
