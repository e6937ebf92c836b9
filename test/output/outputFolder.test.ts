// The one output-folder writer (src/output/outputFolder.ts), the rule of what it may
// replace (outputTarget.ts) and the ownership marker (outputMarker.ts), checked on real
// folders: a folder appears complete or not at all, only folders holding nothing but the
// files their marker lists are replaced, nothing is deleted that the marker does not list,
// links are never followed, and --force moves a foreign folder aside.

import { existsSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { OutputFolder, removeOwnedFolder, writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget, classifyFolder, type OutputTargetOptions } from '../../src/output/outputTarget.js';
import { markerText, OUTPUT_MARKER, readMarker } from '../../src/output/outputMarker.js';
import { InputError } from '../../src/scenario/inputError.js';

const root = mkdtempSync(join(tmpdir(), 'tiercake-folder-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

let counter = 0;
/** A fresh sandbox acting as current and home folder. */
function sandbox(): { dir: string; options: OutputTargetOptions } {
  const dir = join(root, `box-${counter++}`);
  mkdirSync(join(dir, 'home'), { recursive: true });
  return { dir, options: { option: '--out', cwd: dir, home: join(dir, 'home') } };
}

const identity = { command: 'test', scenarioHash: 'a'.repeat(64) };

describe('writing a folder', () => {
  it('stages every file, writes the marker last and moves the folder into place', async () => {
    const { dir, options } = sandbox();
    const out = join(dir, 'run');
    const { commit } = await writeOutputFolder(checkOutputTarget(out, options), identity, (folder) => {
      folder.write('summary.json', '{}\n');
      folder.write('fields/density.npy', new Uint8Array([1, 2, 3]));
      // Nothing is visible before the commit, and the staging folder is a hidden sibling.
      expect(existsSync(out)).toBe(false);
      expect(readdirSync(dir).some((n) => n.startsWith('.run.tmp-'))).toBe(true);
    });
    expect(commit?.path).toBe(out);
    expect(readFileSync(join(out, 'fields', 'density.npy'))).toEqual(Buffer.from([1, 2, 3]));
    const marker = readMarker(out);
    expect(marker !== null && !('error' in marker) && marker.files).toEqual(['fields/density.npy', 'summary.json']);
    expect(readdirSync(dir).filter((n) => n.includes('.tmp-'))).toEqual([]);
  });

  it('an error while filling leaves the target as it was and no staging folder', async () => {
    const { dir, options } = sandbox();
    const out = join(dir, 'run');
    await expect(
      writeOutputFolder(checkOutputTarget(out, options), identity, (folder) => {
        folder.write('a.txt', 'a');
        throw new Error('writer failed');
      }),
    ).rejects.toThrow('writer failed');
    expect(readdirSync(dir).sort()).toEqual(['home']);
  });

  it('a fill that asks to discard writes nothing', async () => {
    const { dir, options } = sandbox();
    const { commit } = await writeOutputFolder(checkOutputTarget(join(dir, 'run'), options), identity, (folder) => {
      folder.write('a.txt', 'a');
      return { discard: true as const };
    });
    expect(commit).toBeNull();
    expect(readdirSync(dir).sort()).toEqual(['home']);
  });

  it('refuses file names that leave the folder (a writer bug)', () => {
    const { dir, options } = sandbox();
    const folder = new OutputFolder(checkOutputTarget(join(dir, 'run'), options), identity);
    for (const bad of ['../x', '/etc/x', 'a//b', './a', OUTPUT_MARKER]) expect(() => folder.write(bad, 'x')).toThrow(/not a plain relative file name/);
    folder.discard();
  });
});

describe('what may be replaced', () => {
  it('a folder of ours is replaced atomically; its old files are gone, the new ones are there', async () => {
    const { dir, options } = sandbox();
    const out = join(dir, 'run');
    await writeOutputFolder(checkOutputTarget(out, options), identity, (f) => {
      f.write('old.txt', 'old');
      f.write('sub/deep/x.txt', 'x');
    });
    expect(classifyFolder(out)).toEqual({ kind: 'owned', files: ['old.txt', 'sub/deep/x.txt'] });
    const { commit } = await writeOutputFolder(checkOutputTarget(out, options), identity, (f) => f.write('new.txt', 'new'));
    expect(commit?.leftover).toBeNull();
    expect(readdirSync(out).sort()).toEqual([OUTPUT_MARKER, 'new.txt']);
    expect(readdirSync(dir).sort()).toEqual(['home', 'run']);
  });

  it('an empty folder is replaced; a folder without the marker is refused, naming --force', async () => {
    const { dir, options } = sandbox();
    mkdirSync(join(dir, 'empty'));
    await writeOutputFolder(checkOutputTarget(join(dir, 'empty'), options), identity, (f) => f.write('a.txt', 'a'));
    expect(existsSync(join(dir, 'empty', 'a.txt'))).toBe(true);
    mkdirSync(join(dir, 'theirs'));
    writeFileSync(join(dir, 'theirs', 'thesis.tex'), 'x');
    expect(() => checkOutputTarget(join(dir, 'theirs'), options)).toThrow(InputError);
    expect(() => checkOutputTarget(join(dir, 'theirs'), options)).toThrow(/no \.tiercake-output\.json.*--force/);
  });

  it('a folder of ours with a file added (or a link inside) is not ours any more', async () => {
    const { dir, options } = sandbox();
    const out = join(dir, 'run');
    await writeOutputFolder(checkOutputTarget(out, options), identity, (f) => f.write('images/a.png', 'png'));
    writeFileSync(join(out, 'images', 'notes.txt'), 'mine');
    expect(classifyFolder(out)).toEqual({ kind: 'foreign', reason: 'holds images/notes.txt, which tiercake did not write' });
    rmSync(join(out, 'images', 'notes.txt'));
    symlinkSync(dir, join(out, 'images', 'elsewhere'));
    expect(classifyFolder(out).kind).toBe('foreign');
    // A marker that lists a file does not make a link of that name ours.
    rmSync(join(out, 'images', 'elsewhere'));
    rmSync(join(out, 'images', 'a.png'));
    symlinkSync(join(dir, 'home'), join(out, 'images', 'a.png'));
    expect(classifyFolder(out)).toMatchObject({ kind: 'foreign', reason: expect.stringContaining('symbolic link') });
  });

  it('--force moves a foreign folder aside and deletes nothing', async () => {
    const { dir, options } = sandbox();
    mkdirSync(join(dir, 'theirs'));
    writeFileSync(join(dir, 'theirs', 'thesis.tex'), 'chapter 1');
    const { commit } = await writeOutputFolder(checkOutputTarget(join(dir, 'theirs'), { ...options, force: true }), identity, (f) => f.write('a.txt', 'a'));
    expect(commit?.movedAsideTo).toMatch(/theirs\.replaced-\d{8}T\d{6}$/);
    expect(readFileSync(join(commit?.movedAsideTo as string, 'thesis.tex'), 'utf8')).toBe('chapter 1');
    expect(readdirSync(join(dir, 'theirs')).sort()).toEqual([OUTPUT_MARKER, 'a.txt']);
  });

  it('the target is checked again at commit: a file put in the folder during the run stops the commit', async () => {
    const { dir, options } = sandbox();
    const out = join(dir, 'run');
    await writeOutputFolder(checkOutputTarget(out, options), identity, (f) => f.write('a.txt', 'a'));
    const target = checkOutputTarget(out, options);
    await expect(
      writeOutputFolder(target, identity, (f) => {
        f.write('b.txt', 'b');
        writeFileSync(join(out, 'late.txt'), 'written meanwhile');
      }),
    ).rejects.toThrow(/late\.txt, which tiercake did not write/);
    expect(readdirSync(out).sort()).toEqual([OUTPUT_MARKER, 'a.txt', 'late.txt']);
    expect(readdirSync(dir).filter((n) => n.includes('.tmp-'))).toEqual([]);
  });
});

describe('paths that are always refused', () => {
  it('names the option and says why, for links, files, devices, paths under files, and protected folders', () => {
    const { dir, options } = sandbox();
    writeFileSync(join(dir, 'file.txt'), 'x');
    mkdirSync(join(dir, 'real'));
    symlinkSync('real', join(dir, 'link'));
    mkdirSync(join(dir, 'inputs'));
    writeFileSync(join(dir, 'inputs', 'scenario.json'), '{}');
    const cases: Array<[string, RegExp]> = [
      [join(dir, 'link'), /is a symbolic link/],
      [join(dir, 'file.txt'), /is a file, not a folder/],
      [join(dir, 'file.txt', 'x'), /lies under .*file\.txt, which is a file/],
      ['/dev/null', /is a device/],
      ['/dev/null/x', /lies under \/dev\/null, which is a device/],
      [dir, /is the current folder/],
      [root, /is the current folder or holds it/],
      [join(dir, 'home'), /is your home folder/],
      ['/', /root of the filesystem/],
      ['~', /did not expand "~"/],
      ['', /the folder name is empty/],
      [join(dir, 'inputs'), /holds .*scenario\.json, an input of this run/],
    ];
    for (const [path, why] of cases) {
      const run = () => checkOutputTarget(path, { ...options, force: true, inputs: [join(dir, 'inputs', 'scenario.json')] });
      expect(run, path).toThrow(InputError);
      expect(run, path).toThrow(why);
      expect(run, path).toThrow(/^--out /);
    }
    // The link and what it points to are untouched.
    expect(lstatSync(join(dir, 'link')).isSymbolicLink()).toBe(true);
  });
});

describe('the marker', () => {
  it('round-trips through its zod schema and refuses foreign or damaged markers', () => {
    const { dir } = sandbox();
    const folder = join(dir, 'm');
    mkdirSync(folder);
    expect(readMarker(folder)).toBeNull();
    writeFileSync(join(folder, OUTPUT_MARKER), markerText(identity, ['b.txt', 'a.txt'], '2026-01-01T00:00:00.000Z'));
    const marker = readMarker(folder);
    expect(marker).toMatchObject({ tool: { name: 'tiercake' }, command: 'test', files: ['a.txt', 'b.txt'] });
    writeFileSync(join(folder, OUTPUT_MARKER), '{not json');
    expect(readMarker(folder)).toEqual({ error: `its ${OUTPUT_MARKER} is not valid JSON` });
    writeFileSync(join(folder, OUTPUT_MARKER), JSON.stringify({ ...JSON.parse(markerText(identity, ['../../etc/passwd'], 'now')) }));
    expect(readMarker(folder)).toEqual({ error: `its ${OUTPUT_MARKER} is not a tiercake marker` });
  });

  it('removeOwnedFolder removes only a folder of ours that holds nothing else', async () => {
    const { dir, options } = sandbox();
    const out = join(dir, 'ckpt');
    await writeOutputFolder(checkOutputTarget(out, options), identity, (f) => f.write('phi.npy', 'x'));
    writeFileSync(join(out, 'keep.txt'), 'mine');
    expect(removeOwnedFolder(out)).toBe(false);
    expect(existsSync(join(out, 'keep.txt'))).toBe(true);
    rmSync(join(out, 'keep.txt'));
    expect(removeOwnedFolder(out)).toBe(true);
    expect(existsSync(out)).toBe(false);
    mkdirSync(join(dir, 'theirs'));
    writeFileSync(join(dir, 'theirs', 'x'), 'x');
    expect(removeOwnedFolder(join(dir, 'theirs'))).toBe(false);
    expect(removeOwnedFolder(join(dir, 'missing'))).toBe(false);
  });
});
