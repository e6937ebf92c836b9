// The output folder of a finished solve (src/output/solveFolder.ts), read back: the marker
// carries the command and the scenario's 'whole' hash and lists exactly the files written,
// the warnings returned are those summary.json lists, and the fields read back with
// src/formats/npy.ts are the solution's arrays with the lattice's shape.
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeSolveFolder } from '../../src/output/solveFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { decodeNpy } from '../../src/formats/npy.js';
import { landscapeFileHashes, scenarioHash } from '../../src/scenario/scenarioHash.js';
import { tinyFolder, tinySolve } from '../helpers/tinyRuns.js';

const dir = tinyFolder('solve-folder');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('writeSolveFolder', () => {
  it('writes fields, summary and report under the scenario hash; the warnings are the summary ones', async () => {
    const a = await tinySolve(dir);
    const out = join(dir, 'run');
    const r = await writeSolveFolder(checkOutputTarget(out, { option: '--out' }), a, () => '2026-02-03T04:05:06.000Z');
    expect(r.commit?.path).toBe(out);
    const marker = readMarker(out) as { command: string; scenarioHash: string; files: string[] };
    expect(marker.command).toBe('solve');
    expect(marker.scenarioHash).toBe(scenarioHash(a.scenario, 'whole', landscapeFileHashes(a.resolved)));
    expect([...marker.files].sort()).toEqual([...r.files].sort());
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.warnings).toEqual(r.warnings.map((w) => ({ code: w.code, message: w.message })));
    expect(summary.files).toEqual(r.files);
    const density = decodeNpy(readFileSync(join(out, 'fields/density.npy')));
    expect(density.shape).toEqual([6, 6]);
    expect(Array.from(density.data)).toEqual(Array.from(a.fields.density));
    expect(Array.from(decodeNpy(readFileSync(join(out, 'fields/mott_filling.npy'))).data)).toEqual(Array.from(a.classification.mottFilling));
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain('2026-02-03');
  });
});
