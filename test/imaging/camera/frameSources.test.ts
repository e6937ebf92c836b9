// Direct test of src/imaging/camera/frameSources.ts: frame sources read from real files in a
// temporary folder, built byte by byte from the .npy format document (NEP 1; fileBytes.ts,
// not the reader under test). Checked by hand: the frames and their values in the camera
// convention (values[row * width + col]), natural name order of a folder (shot2 before
// shot10, other files skipped), labels and inputs, frames addressed inside a shot file, and
// the refusals, each naming the option that was given.

import { afterAll, describe, expect, it } from 'vitest';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { frameFilesIn, parseInShotAddress, readFrameSource, readFrameSources, readShotFrames, shotFiles } from '../../../src/imaging/camera/frameSources.js';
import { InputError } from '../../../src/scenario/inputError.js';
import { buildNpy } from './fileBytes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-frame-sources-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A 2 x 3 frame (rows x columns) whose values tell which frame and pixel they are: 100 k + 10 row + col. */
const frameValues = (k: number) => [0, 1, 2, 10, 11, 12].map((v) => 100 * k + v);
const write = (path: string, frames: number[]) => {
  const values = frames.flatMap(frameValues);
  writeFileSync(path, buildNpy('<f8', frames.length === 1 ? [2, 3] : [frames.length, 2, 3], values));
  return path;
};

const folder = join(dir, 'shots');
mkdirSync(folder);
write(join(folder, 'shot10.npy'), [10]);
write(join(folder, 'shot2.npy'), [2]);
write(join(folder, 'Shot3.npy'), [3]);
writeFileSync(join(folder, 'notes.txt'), 'exposure 20 ms\n');
writeFileSync(join(folder, 'shot1.json'), '{}');
write(join(folder, '.hidden.npy'), [99]);
const stack = write(join(dir, 'stack.npy'), [0, 1, 2]);
const single = write(join(dir, 'single.npy'), [7]);

async function refusal(p: Promise<unknown> | (() => unknown)): Promise<string> {
  try {
    await (typeof p === 'function' ? p() : p);
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return (err as Error).message;
  }
  throw new Error('expected a refusal');
}

describe('frame sources', () => {
  it('reads every frame of a file in file order, in the camera convention', async () => {
    const set = await readFrameSource(` ${stack} `, '--image');
    expect(set.frames.map((f) => [f.width, f.height])).toEqual([[3, 2], [3, 2], [3, 2]]);
    set.frames.forEach((f, k) => expect(Array.from(f.values)).toEqual(frameValues(k)));
    expect(set.labels).toEqual([0, 1, 2].map((k) => `${stack} [frame ${k}]`));
    expect(set.inputs).toEqual([stack]);
    expect(set.format).toBe('npy float64');
  });
  it('reads a folder in natural name order, skipping hidden and non-frame files', async () => {
    expect(frameFilesIn(folder, '--image')).toEqual(['shot2.npy', 'Shot3.npy', 'shot10.npy'].map((n) => join(folder, n)));
    const set = await readFrameSource(folder, '--image');
    expect(set.frames.map((f) => f.values[0])).toEqual([200, 300, 1000]);
    expect(set.labels).toEqual(['shot2.npy', 'Shot3.npy', 'shot10.npy'].map((n) => join(folder, n)));
    expect(set.inputs).toEqual([folder]);
  });
  it('joins a comma-separated list in order', async () => {
    const set = await readFrameSources(`${single},${stack}`, '--image');
    expect(set.frames.map((f) => f.values[0])).toEqual([700, 0, 100, 200]);
    expect(set.inputs).toEqual([single, stack]);
  });
  it('lists shot files of a folder or a list', () => {
    expect(shotFiles(`${folder}`, '--shots')).toEqual(frameFilesIn(folder, '--shots'));
    expect(shotFiles(` ${single} , ${stack} ,`, '--shots')).toEqual([single, stack]);
  });
  it('addresses frames inside a shot file by index, once per role', async () => {
    expect(parseInShotAddress(' /shot/atoms ', '--image')).toEqual({ dataset: '/shot/atoms' });
    expect(parseInShotAddress('2', '--image')).toEqual({ frame: 2 });
    const frames = await readShotFrames(stack, ['2', '0', '1'], '--absorption-frames');
    expect(frames.map((f) => f.values[4])).toEqual([211, 11, 111]);
  });
  it('refuses, naming the option', async () => {
    expect(await refusal(readFrameSource(join(dir, 'absent.npy'), '--region-mask'))).toBe(`--region-mask: ${join(dir, 'absent.npy')} was not found or cannot be read; check the path`);
    expect(await refusal(readFrameSource('  ', '--image'))).toMatch(/^--image: a source is empty/);
    const empty = join(dir, 'empty');
    mkdirSync(empty);
    writeFileSync(join(empty, 'readme.txt'), 'nothing here');
    expect(await refusal(() => frameFilesIn(empty, '--shots'))).toBe(`--shots: the folder ${empty} holds no TIFF, HDF5, FITS, .npy or PNG frame file`);
    expect(await refusal(() => shotFiles(' , ', '--shots'))).toMatch(/^--shots: give a folder of shot files/);
    expect(await refusal(() => parseInShotAddress('atoms', '--image'))).toMatch(/^--image: with --shots, name each frame inside a shot file/);
    expect(await refusal(readShotFrames(stack, ['3'], '--image'))).toBe('--image: stack.npy holds 3 frame(s), numbered from 0; there is no frame 3');
    const text = join(dir, 'text.npy');
    writeFileSync(text, 'not an array');
    expect(await refusal(readFrameSource(text, '--background-frame'))).toMatch(/^--background-frame: /);
  });
});
