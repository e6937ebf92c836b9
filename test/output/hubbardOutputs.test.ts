// Files of `tiercake hubbard` (src/output/hubbardOutputs.ts): the CSV is the table's, the
// text is what was printed, the plot is a PNG.

import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { LASER_CAUTION_ID, laserCautionShownBefore, writeHubbardFiles, writeHubbardFolder } from '../../src/output/hubbardOutputs.js';
import { readMarker } from '../../src/output/outputMarker.js';
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

  it('the laser caution: recorded in the marker with the estimate, then known as shown for that folder', async () => {
    const rows = hubbardTable({ species: '87Rb', wavelengthNm: 1064, depthsEr: [8] });
    const out = join(dir, 'caution');
    const target = () => checkOutputTarget(out, { option: '--out' });
    expect(laserCautionShownBefore(null)).toBe(false); // no folder: shown on every run
    expect(laserCautionShownBefore(target())).toBe(false); // a new folder
    const about = { speciesName: '87Rb', wavelengthNm: 1064, laserCaution: true };
    const commit = await writeHubbardFolder(target(), rows, 'table\nCAUTION: x\n', about);
    expect(commit?.path).toBe(out);
    expect((readMarker(out) as { cautions?: string[] }).cautions).toEqual([LASER_CAUTION_ID]);
    expect(readFileSync(join(out, 'hubbard.txt'), 'utf8')).toBe('table\nCAUTION: x\n');
    expect(laserCautionShownBefore(target())).toBe(true);
    // rewritten without an estimate: the marker no longer records the caution
    await writeHubbardFolder(target(), rows, 'table\n', { ...about, laserCaution: false });
    expect((readMarker(out) as { cautions?: string[] }).cautions ?? []).toEqual([]);
    expect(laserCautionShownBefore(target())).toBe(false);
  });
});
