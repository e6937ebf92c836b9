// Files of an `evolve` run (src/output/evolveOutputs.ts, written through evolveFolder.ts),
// read back: evolution.csv and spectrum.csv hold the pipeline's numbers unchanged (String(x)
// is the shortest decimal that reads back as the same double, csv.ts), every .npy file read
// back with src/formats/npy.ts is the field it came from with the lattice's shape, and the
// keys of summary.json hold the values the evolution returned; the marker lists every file.
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildEvolveSummary, energyUnitOf, evolutionCsvFiles, snapshotFieldFiles, spectrumCsvFiles } from '../../src/output/evolveOutputs.js';
import { writeEvolveFolder } from '../../src/output/evolveFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { decodeNpy } from '../../src/formats/npy.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';
import type { EvolveArtifacts } from '../../src/pipeline/evolveScenario.js';
import { tinyEvolve, tinyFolder } from '../helpers/tinyRuns.js';

const dir = tinyFolder('evolve-outputs');
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let a: EvolveArtifacts;
let files: string[];
const out = join(dir, 'run');
beforeAll(async () => {
  a = await tinyEvolve(dir);
  files = (await writeEvolveFolder(checkOutputTarget(out, { option: '--out' }), a, () => '2026-01-01T00:00:00.000Z')).files;
});

function csv(file: string): { names: string[]; rows: number[][] } {
  const [header, ...rows] = readFileSync(join(out, file), 'utf8').trim().split('\n');
  return { names: header.split(','), rows: rows.map((r) => r.split(',').map((v) => (v === 'nan' ? NaN : Number(v)))) };
}

describe('evolve files', () => {
  it('evolution.csv: one row per output time, the series unchanged', () => {
    const t = csv('evolution.csv');
    const s = a.series;
    expect(t.rows.length).toBe(s.time.length);
    expect(s.time).toEqual([0, 0.5, 1, 1.5, 2]);
    const column = (name: string) => t.rows.map((r) => r[t.names.indexOf(name)]);
    expect(column('time')).toEqual(s.time);
    expect(column('energy')).toEqual(s.energy);
    expect(column('atoms')).toEqual(s.atoms);
    expect(column('doublons')).toEqual(s.doublons);
    expect(column('hopping')).toEqual(s.hopping);
    expect(column('hopping')[4]).toBeCloseTo(0.03, 12); // the ramp's end value, energy unit U
    expect(column('condensate_fraction')).toEqual(s.condensedAtoms.map((c, k) => c / s.atoms[k]));
    expect(readFileSync(join(out, 'evolution.csv'), 'utf8')).toBe(evolutionCsvFiles(a)[0].text);
  });

  it('spectrum.csv: one row per frequency', () => {
    const t = csv('spectrum.csv');
    expect(t.rows.map((r) => r[t.names.indexOf('frequency')])).toEqual([0.5, 1]);
    expect(t.rows.map((r) => r[t.names.indexOf('energy_absorbed')])).toEqual(a.spectrum!.points.map((p) => p.energyAbsorbed));
    expect(spectrumCsvFiles({ ...a, spectrum: null })).toEqual([]);
  });

  it('snapshots and reference fields read back as the arrays they came from', () => {
    expect(a.snapshots.map((s) => s.time)).toEqual([0, 2]);
    const back = (file: string) => decodeNpy(readFileSync(join(out, file)), file);
    for (const s of a.snapshots) {
      const folder = `snapshots/s${String(s.index).padStart(2, '0')}`;
      const density = back(`${folder}/density.npy`);
      expect(density.shape).toEqual([3, 3]);
      expect(Array.from(density.data)).toEqual(Array.from(s.fields.density));
      expect(Array.from(back(`${folder}/order_parameter_im.npy`).data)).toEqual(Array.from(s.fields.phiIm));
      expect(Array.from(back(`${folder}/order_parameter_abs.npy`).data)).toEqual(Array.from(s.fields.condensateDensity, Math.sqrt));
    }
    expect(Array.from(back('fields/reference_density.npy').data)).toEqual(Array.from(a.reference.fields.density));
    expect(Array.from(back('fields/reference_mott_filling.npy').data)).toEqual(Array.from(a.reference.classification.mottFilling));
    expect(snapshotFieldFiles(a).length).toBe(2 * 7 + 3);
  });

  it('summary.json holds the values the evolution returned; the marker lists every file', () => {
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.command).toBe('evolve');
    expect(summary.status).toBe(a.status);
    expect(summary.trustworthy).toBe(a.trustworthy);
    expect(summary.start.atoms).toBe(a.start.outcome.solve.totals.atoms);
    expect(summary.start.chemicalPotential).toBe(a.start.outcome.solve.mu);
    expect(summary.reference.atoms).toBe(a.reference.outcome.solve.totals.atoms);
    expect(summary.verdict.adiabatic).toBe(a.verdict!.adiabaticOverall);
    expect(summary.verdict.excessEnergyPerAtomU).toBe(a.verdict!.excessEnergyPerAtomInScale);
    expect(summary.spectrum.points.map((p: { energyAbsorbed: number }) => p.energyAbsorbed)).toEqual(a.spectrum!.points.map((p) => p.energyAbsorbed));
    expect(summary.evolution.outputTimes).toBe(5);
    expect(summary.evolution.quenchAtStart).toEqual([]);
    expect(summary.files).toEqual(files);
    expect(buildEvolveSummary(a, files)).toEqual(JSON.parse(JSON.stringify(summary)));
    expect(energyUnitOf(a)).toBe('U');
    const marker = readMarker(out) as { command: string; scenarioHash: string; files: string[] };
    expect(marker.command).toBe('evolve');
    expect(marker.scenarioHash).toBe(scenarioHash(a.prepared.scenario));
    expect([...marker.files].sort()).toEqual([...files].sort());
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain('2026-01-01');
  });
});
