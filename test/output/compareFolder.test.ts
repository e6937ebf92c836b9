// The output folder of a finished compare (src/output/compareFolder.ts), on the small fit
// of test/helpers/smallCompareFit.ts: the marker names the command and the hash of the
// scenario as run (scenarioHash of the whole scenario with its landscape files, computed
// here from the fit's own scenario), lists exactly the files comparison.json lists plus
// the report, and the report carries the time stamp it was given.
// Mutation tried: the command name 'compare' -> 'comparison' in the folder's identity: the marker check fails.
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeCompareFolder } from '../../src/output/compareFolder.js';
import type { CompareProvenance } from '../../src/output/compareOutputs.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import type { CompareFit } from '../../src/pipeline/compareFit.js';
import { landscapeFileHashes, scenarioHash } from '../../src/scenario/scenarioHash.js';
import { smallCompareFit } from '../helpers/smallCompareFit.js';

let fit: CompareFit;
let dir = '';
let scenarioPath = '';
beforeAll(async () => {
  ({ fit, dir, scenarioPath } = await smallCompareFit());
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('compare folder', () => {
  it('commits the files, the report and a marker with the scenario hash', async () => {
    const out = join(dir, 'cmp');
    const provenance: CompareProvenance = { scenarioPath, overrides: [], imagePath: join(dir, 'small.npy'), scaleFrom: 'command-line options' };
    const readings = { eos: { available: false as const, reason: 'not asked' }, thermometry: { available: false as const, reason: 'one shot' } };
    const commit = await writeCompareFolder(checkOutputTarget(out, { option: '--out' }), fit, provenance, readings, () => '2026-05-06T07:08:09.000Z');
    expect(commit?.path).toBe(out);
    const marker = readMarker(out) as { command: string; scenarioHash: string; files: string[] };
    expect(marker.command).toBe('compare');
    expect(marker.scenarioHash).toBe(scenarioHash(fit.prepared.scenario, 'whole', landscapeFileHashes(fit.prepared.resolved)));
    const summary = JSON.parse(readFileSync(join(out, 'comparison.json'), 'utf8'));
    expect([...marker.files].sort()).toEqual([...summary.files, 'report.html'].filter((f, i, a) => a.indexOf(f) === i).sort());
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain('2026-05-06T07:08:09.000Z');
  });
});
