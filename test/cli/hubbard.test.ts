// `tiercake hubbard` end to end: the CSV it writes puts the mean-field n = 1 transition of
// 87Rb in a cubic 852 nm lattice (U/J = 6 x 5.83) between 12.5 and 13.5 E_r (Greiner et al.,
// Nature 415, 39 (2002)), and bad options exit with code 2 and write nothing.
import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';

describe('tiercake hubbard', () => {
  it('tabulates J and U against depth and crosses the mean-field critical point near 13 E_r', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'tiercake-hubbard-')), 'table');
    expect(await runCli(['hubbard', '--species', '87Rb', '--wavelength-nm', '852', '--depth', '10:16:13', '--out', out])).toBe(0);
    for (const f of ['hubbard.csv', 'hubbard.png', 'hubbard.txt']) expect(existsSync(join(out, f))).toBe(true);
    const [header, ...rows] = readFileSync(join(out, 'hubbard.csv'), 'utf8').trim().split('\n');
    const names = header.split(',');
    const depth = names.indexOf('depth_Er');
    const rel = names.indexOf('U_over_zJ_relative_to_mean_field_critical');
    const values = rows.map((r) => r.split(',').map(Number));
    // relative U/(zJ) rises monotonically with depth; find where it crosses 1
    let crossing = NaN;
    for (let k = 1; k < values.length; k++) {
      expect(values[k][rel]).toBeGreaterThan(values[k - 1][rel]);
      if (values[k - 1][rel] < 1 && values[k][rel] >= 1) {
        const t = (1 - values[k - 1][rel]) / (values[k][rel] - values[k - 1][rel]);
        crossing = values[k - 1][depth] + t * (values[k][depth] - values[k - 1][depth]);
      }
    }
    expect(crossing).toBeGreaterThan(12.5);
    expect(crossing).toBeLessThan(13.5);
  });

  it('refuses bad options with exit code 2', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'tiercake-hubbard-')), 'table');
    for (const args of [
      ['--species', 'Unobtainium', '--wavelength-nm', '1064'],
      ['--species', '87Rb', '--wavelength-nm', '-5'],
      ['--species', '87Rb', '--wavelength-nm', '1064', '--depth', '10:5'],
      ['--species', '87Rb', '--wavelength-nm', '1064', '--axes', '2'],
    ]) {
      expect(await runCli(['hubbard', ...args, '--out', out])).toBe(2);
      expect(existsSync(out)).toBe(false);
    }
  });
});
