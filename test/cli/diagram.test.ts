// `tiercake diagram` end to end: the CSV boundaries it writes agree with the analytic
// mean-field lobe boundary zJ/U = (n - x)(x - n + 1)/(1 + x), x = mu/U, and the tips with
// zJ/U = 2n + 1 - 2 sqrt(n(n+1)) at mu/U = sqrt(n(n+1)) - 1 (van Oosten, van der Straten &
// Stoof, PRA 63, 053601 (2001); Sheshadri et al., EPL 22, 257 (1993)).
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';

function readCsv(path: string): Record<string, number[]> {
  const lines = readFileSync(path, 'utf8').split('\n').filter((l) => l.length > 0 && !l.startsWith('#'));
  const names = lines[0].split(',');
  const out: Record<string, number[]> = Object.fromEntries(names.map((n) => [n, []]));
  for (const line of lines.slice(1)) line.split(',').forEach((v, k) => out[names[k]].push(Number(v)));
  return out;
}

describe('tiercake diagram', () => {
  it('writes the map, and the computed boundaries agree with the analytic formula to 1e-4', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'tiercake-diagram-')), 'map');
    const code = await runCli(['diagram', '--grid', '60x80', '--mu', '0:3', '--out', out]);
    expect(code).toBe(0);
    for (const f of ['phase_map.png', 'lobe_boundaries.csv', 'lobe_tips.csv', 'phase_map_grid.csv', 'report.html']) {
      expect(existsSync(join(out, f))).toBe(true);
    }
    const b = readCsv(join(out, 'lobe_boundaries.csv'));
    expect(b.filling.length).toBeGreaterThan(1000);
    let checked = 0;
    for (let k = 0; k < b.filling.length; k++) {
      const n = b.filling[k];
      const x = b.mu_over_U[k];
      if (n < 1 || n > 3) continue;
      expect(Math.abs(b.zJ_over_U[k] - ((n - x) * (x - n + 1)) / (1 + x))).toBeLessThan(1e-4);
      checked++;
    }
    expect(checked).toBeGreaterThan(1000);
    const tips = readCsv(join(out, 'lobe_tips.csv'));
    for (let k = 0; k < tips.filling.length; k++) {
      const n = tips.filling[k];
      expect(Math.abs(tips.tip_zJ_over_U[k] - (2 * n + 1 - 2 * Math.sqrt(n * (n + 1))))).toBeLessThan(1e-4);
      // the curve is flat at the tip: mu to 1e-2 with 400 samples per lobe
      expect(Math.abs(tips.tip_mu_over_U[k] - (Math.sqrt(n * (n + 1)) - 1))).toBeLessThan(1e-2);
    }
    // The grid: phi vanishes inside the n = 1 lobe and is finite outside.
    const g = readCsv(join(out, 'phase_map_grid.csv'));
    for (let k = 0; k < g.phi.length; k++) {
      const z = g.zJ_over_U[k];
      const x = g.mu_over_U[k];
      if (x <= 0.02 || x >= 0.98) continue;
      const zc = ((1 - x) * x) / (1 + x);
      if (z < 0.98 * zc) expect(g.phi[k]).toBe(0);
      if (z > 1.02 * zc) expect(g.phi[k]).toBeGreaterThan(0);
    }
  });

  it('draws the superfluid edge at T > 0 as one curve, clipped at the frame (not drawn twice, not pinned to the edge)', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'tiercake-diagram-')), 'map');
    expect(await runCli(['diagram', '--grid', '40x40', '--kt', '0.1', '--zj-max', '0.15', '--out', out])).toBe(0);
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    const overlays = [...html.matchAll(/<path class="overlay" d="([^"]+)"/g)].map((m) => m[1]!);
    expect(overlays).toHaveLength(1);
    // One pen-down move: the fillings' pieces join into one path.
    expect(overlays[0]!.match(/M/g)).toHaveLength(1);
    expect(html).toMatch(/<g class="overlays" clip-path="url\(#[^)]+-image-clip\)"/);
    // The edge runs past zJ/U = 0.15 near mu = 0 at this temperature: its points there lie
    // right of the image (clipped), where the old drawing pinned them onto the frame.
    const image = /<image class="pixels" x="([^"]+)" y="[^"]+" width="([^"]+)"/.exec(html)!;
    const right = Number(image[1]) + Number(image[2]);
    const xs = [...overlays[0]!.matchAll(/[ML](-?[\d.]+) /g)].map((m) => Number(m[1]));
    expect(Math.max(...xs)).toBeGreaterThan(right + 1);
  });

  it('--cluster 2x2: the n = 1 lobe of cluster mean field encloses the single-site one and its tip lies between single-site and Monte Carlo', async () => {
    // Outside references: the single-site boundary in closed form (above) and the quantum
    // Monte Carlo tip (U/J)c = 16.74 on the square lattice (Capogrosso-Sansone, Soyler,
    // Prokof'ev & Svistunov, PRA 77, 015602 (2008)); clusters add exact bonds, so their
    // Mott lobe can only grow from the single-site one toward the exact one.
    const out = join(mkdtempSync(join(tmpdir(), 'tiercake-diagram-')), 'map');
    expect(await runCli(['diagram', '--grid', '30x30', '--mu', '0:1', '--cluster', '2x2', '--out', out])).toBe(0);
    const b = readCsv(join(out, 'cluster_lobes.csv'));
    expect(b.filling.every((n) => n === 1)).toBe(true);
    expect(b.filling.length).toBe(48);
    for (let k = 0; k < b.filling.length; k++) {
      const x = b.mu_over_U[k];
      expect(b.zJ_over_U[k]).toBeGreaterThanOrEqual(((1 - x) * x) / (1 + x) - 1e-9);
    }
    const tip = Math.max(...b.zJ_over_U);
    expect(4 / tip).toBeLessThan(4 / (3 - 2 * Math.SQRT2) - 0.5); // below the single-site 23.31 (tip zJ/U = 3 - 2 sqrt 2, as above)
    expect(4 / tip).toBeGreaterThan(16.74);
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    expect(html).toMatch(/Cluster mean field \(2×2 clusters\)/);
    expect(html).toMatch(/16\.74/);
    // the single-site edge, the cluster lobe and the Monte Carlo line
    expect([...html.matchAll(/<path class="overlay"/g)]).toHaveLength(3);
  });

  it('refuses bad options with exit code 2 and writes nothing', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'tiercake-diagram-')), 'map');
    for (const args of [['--grid', '10by10'], ['--mu', '3:1'], ['--kt', '-1'], ['--nmax', '3', '--mu', '0:3'], ['--shade', 'rainbow'], ['--cluster', '2by2'], ['--cluster', '2x2', '--kt', '0.1'], ['--cluster', '5x5']]) {
      expect(await runCli(['diagram', ...args, '--out', out])).toBe(2);
      expect(existsSync(out)).toBe(false);
    }
  });
});
