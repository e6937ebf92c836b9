// Files of `tiercake hubbard` (src/output/hubbardOutputs.ts): the CSV is the table's, the
// text is what was printed, the plot is a PNG.

import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeHubbardFiles } from '../../src/output/hubbardOutputs.js';
import { writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { formatHubbardTable, hubbardCsv, hubbardTable } from '../../src/pipeline/hubbardTable.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-hubbard-out-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('hubbard files', () => {
  it('CSV, text and plot', async () => {
    const rows = hubbardTable({ species: '87Rb', wavelengthNm: 1064, depthsEr: [8, 12, 16] });
    const text = formatHubbardTable(rows);
    const out = join(dir, 'table');
    await writeOutputFolder(checkOutputTarget(out, { option: '--out' }), { command: 'hubbard', scenarioHash: null }, (folder) =>
      writeHubbardFiles(rows, text, { speciesName: '87Rb', wavelengthNm: 1064 }, folder),
    );
    expect(readFileSync(join(out, 'hubbard.csv'), 'utf8')).toBe(hubbardCsv(rows));
    expect(readFileSync(join(out, 'hubbard.txt'), 'utf8')).toBe(text);
    expect(readFileSync(join(out, 'hubbard.png')).subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
  });
});
