// Direct test of src/pipeline/compareShotFiles.ts: shots read from .npy files written in the
// test (NEP 1 bytes built by test/imaging/camera/fileBytes.ts, not by the reader), paired as
// the options say. Every frame's values name the file and frame it came from (1000 f + 100 k +
// pixel), so a pairing can be checked by hand: signal, probe and dark of each shot, one
// background or probe frame for all shots, one file per shot (--shots) with roles addressed
// by frame index, the region mask, and the refusals named after the option.

import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { perShot, readCompareShots, readRawShots } from '../../src/pipeline/compareShotFiles.js';
import { InputError } from '../../src/scenario/inputError.js';
import { buildNpy } from '../imaging/camera/fileBytes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-shot-files-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const width = 4;
const height = 3;
/** A file of `frames` frames (3 rows x 4 columns) holding 1000 f + 100 k + pixel index. */
function npy(name: string, f: number, frames: number, values?: (q: number) => number): string {
  const path = join(dir, name);
  const all: number[] = [];
  for (let k = 0; k < frames; k++) for (let q = 0; q < width * height; q++) all.push(values !== undefined ? values(q) : 1000 * f + 100 * k + q);
  writeFileSync(path, buildNpy('<f8', frames === 1 ? [height, width] : [frames, height, width], all));
  return path;
}
const first = (image: { values: Float64Array }) => image.values[0];

const atoms = npy('atoms.npy', 1, 3);
const probe = npy('probe.npy', 2, 1);
const dark = npy('dark.npy', 3, 3);
const twoBackgrounds = npy('two.npy', 4, 2);
const shotA = npy('shotA.npy', 5, 3);
const shotB = npy('shotB.npy', 6, 3);

async function refusal(p: Promise<unknown>): Promise<string> {
  try {
    await p;
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return (err as Error).message;
  }
  throw new Error('expected a refusal');
}

describe('readRawShots', () => {
  it('pairs absorption frames: one probe for all shots, one dark per shot', async () => {
    const set = await readRawShots({ absorptionFrames: `${atoms}, ${probe}, ${dark}` });
    expect(set.shots.map((s) => [first(s.signal), first(s.probe!), first(s.dark!)])).toEqual([
      [1000, 2000, 3000],
      [1100, 2000, 3100],
      [1200, 2000, 3200],
    ]);
    expect(set.shots.map((s) => s.label)).toEqual([0, 1, 2].map((k) => `${atoms} [frame ${k}]`));
    expect(set.inputs).toEqual([atoms, probe, dark]);
    expect(set.format).toBe('npy float64');
  });
  it('pairs pictures with one background frame for all', async () => {
    const set = await readRawShots({ image: atoms, backgroundFrame: probe });
    expect(set.shots.map((s) => [first(s.signal), first(s.dark!)])).toEqual([[1000, 2000], [1100, 2000], [1200, 2000]]);
    expect(set.inputs).toEqual([atoms, probe]);
  });
  it('reads one file per shot with roles addressed inside it', async () => {
    const set = await readRawShots({ absorptionFrames: '0,2,1', shots: `${shotA},${shotB}` });
    expect(set.shots.map((s) => [s.label, first(s.signal), first(s.probe!), first(s.dark!)])).toEqual([
      [shotA, 5000, 5200, 5100],
      [shotB, 6000, 6200, 6100],
    ]);
    expect(set.format).toBe('2 shot file(s)');
    const counts = await readRawShots({ image: '1', backgroundFrame: '0', shots: shotA });
    expect([first(counts.shots[0].signal), first(counts.shots[0].dark!)]).toEqual([5100, 5000]);
  });
  it('refuses a frame count that fits neither one for all nor one per shot', async () => {
    expect(await refusal(readRawShots({ image: atoms, backgroundFrame: twoBackgrounds }))).toBe('--background-frame: 2 background frame(s) for 3 shot(s); give one for all shots or one per shot');
    expect(await refusal(readRawShots({ absorptionFrames: `${atoms},${twoBackgrounds}` }))).toBe('--absorption-frames: 2 probe frame(s) for 3 shot(s); give one for all shots or one per shot');
    expect(() => perShot([], 2, '--x', 'dark')).toThrow('--x: 0 dark frame(s) for 2 shot(s)');
  });
});

describe('readCompareShots', () => {
  const counts = { kind: 'counts' as const, countsPerAtom: 2, unitSource: 'test' };
  const orientation = { transpose: false, flipColumns: false, flipRows: false, rotateDeg: 0 };
  it('applies the region mask read from its file and keeps the preparation for the outputs', async () => {
    const mask = npy('mask.npy', 0, 1, (q) => (q === 5 ? 0 : 1));
    const r = await readCompareShots({ image: atoms, regionMask: mask }, counts, { pixelUm: 1, hotPixels: false, orientation });
    expect(r.prepared.perShot.length).toBe(3);
    expect(r.prepared.measured.usedPixels).toBe(width * height - 1);
    expect(r.preparation.region?.mask?.values[5]).toBe(0);
    expect(r.preparation.region?.rectangle).toBeUndefined();
    // Mean of frames k = 0, 1, 2 at pixel 0: (1000 + 1100 + 1200) / 3 counts / 2 counts per atom.
    expect(r.prepared.measured.values[0 * height + (height - 1)]).toBeCloseTo(550, 10);
    expect(r.inputs).toEqual([atoms]);
  });
  it('names the option behind a fault of the camera core', async () => {
    expect(await refusal(readCompareShots({ image: atoms }, counts, { pixelUm: 1, hotPixels: false, orientation, region: { x0: 2, y0: 0, width: 4, height: 3 } }))).toMatch(
      /^--region: rectangle x0=2, y0=0, width=4, height=3 must be whole pixels inside the 4 x 3 frame/,
    );
    const mask = npy('wrong-mask.npy', 0, 1);
    writeFileSync(mask, buildNpy('<f8', [2, 2], [1, 1, 1, 1]));
    expect(await refusal(readCompareShots({ image: atoms, regionMask: mask }, counts, { pixelUm: 1, hotPixels: false, orientation }))).toBe('--region-mask: mask image is 2 x 2 but the frames are 4 x 3');
  });
});
