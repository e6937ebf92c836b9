// Hostile inputs (issue 14): output paths that would lose data, inputs that were silently
// accepted, and inputs that used to end as internal errors. Each case runs the command line
// in a sandbox folder of its own (its current folder, with $HOME inside it): in this process
// through runCli, and the cases marked `child` as a child process of the built tool
// (dist/main.js), as a user meets them. Every case must
//   - exit with code 2, stdout empty;
//   - print one short paragraph that starts with "tiercake: " and names the option or file,
//     with no stack trace and no JavaScript error name;
//   - leave every file and folder of the sandbox as it was (the tree is snapshotted before
//     and after: type, size and SHA-256 of each file, target of each link), so nothing is
//     deleted, replaced, written through a link or left behind (no staging folder).
// Controls show that the snapshot sees changes: a folder tiercake wrote is replaced, and
// --force moves a foreign folder aside without deleting it.

import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, readlinkSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { runCli } from '../../src/cli/main.js';

const cli = fileURLToPath(new URL('../../dist/main.js', import.meta.url));
const validScenario = readFileSync(fileURLToPath(new URL('../bad-scenarios/_valid-small.json', import.meta.url)), 'utf8');
const root = mkdtempSync(join(tmpdir(), 'tiercake-hostile-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** The paragraph limits: a few lines a user reads at once. */
const MAX_LINES = 6;
const MAX_CHARS = 800;

interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

function runChild(argv: readonly string[], cwd: string): Promise<Run> {
  return new Promise((resolve, reject) => {
    const env: NodeJS.ProcessEnv = { ...process.env, HOME: join(cwd, 'home'), NO_COLOR: '1' };
    delete env.TIERCAKE_DEBUG;
    const child = spawn(process.execPath, [cli, ...argv], { cwd, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString('utf8')));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString('utf8')));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code: code ?? -1, stdout, stderr }));
  });
}

/** runCli in this process with `cwd` as the current folder and $HOME inside it. */
async function runHere(argv: readonly string[], cwd: string): Promise<Run> {
  let stdout = '';
  let stderr = '';
  const capture = (sink: (s: string) => void) =>
    ((chunk: string | Uint8Array, ...rest: unknown[]) => {
      sink(typeof chunk === 'string' ? chunk : Buffer.from(chunk).toString('utf8'));
      const done = rest.find((r) => typeof r === 'function') as (() => void) | undefined;
      done?.();
      return true;
    }) as typeof process.stdout.write;
  const previous = { cwd: process.cwd(), home: process.env.HOME, debug: process.env.TIERCAKE_DEBUG };
  const out = vi.spyOn(process.stdout, 'write').mockImplementation(capture((t) => (stdout += t)));
  const err = vi.spyOn(process.stderr, 'write').mockImplementation(capture((t) => (stderr += t)));
  process.chdir(cwd);
  process.env.HOME = join(cwd, 'home');
  delete process.env.TIERCAKE_DEBUG;
  try {
    const code = await runCli([...argv]);
    return { code, stdout, stderr };
  } finally {
    process.chdir(previous.cwd);
    if (previous.home === undefined) delete process.env.HOME;
    else process.env.HOME = previous.home;
    if (previous.debug !== undefined) process.env.TIERCAKE_DEBUG = previous.debug;
    out.mockRestore();
    err.mockRestore();
  }
}

const run = runHere;

/** Every entry under `dir`: type and content hash (files), link target (links). */
function snapshot(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (rel: string): void => {
    for (const name of readdirSync(join(dir, rel)).sort()) {
      const child = rel ? `${rel}/${name}` : name;
      const full = join(dir, child);
      const st = lstatSync(full);
      if (st.isSymbolicLink()) out.set(child, `link -> ${readlinkSync(full)}`);
      else if (st.isDirectory()) {
        out.set(child, 'folder');
        walk(child);
      } else out.set(child, `file ${st.size} ${createHash('sha256').update(readFileSync(full)).digest('hex')}`);
    }
  };
  walk('');
  return out;
}

/** A .npy file with the given header text and data bytes (NEP 1, version 1.0). */
function npy(header: string, data: Uint8Array, declaredLength?: number): Uint8Array {
  const head = Buffer.from(header, 'latin1');
  const out = new Uint8Array(10 + head.length + data.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0], 0);
  const length = declaredLength ?? head.length;
  out[8] = length & 0xff;
  out[9] = (length >> 8) & 0xff;
  out.set(head, 10);
  out.set(data, 10 + head.length);
  return out;
}

const padded = (dict: string): string => {
  const unpadded = 10 + dict.length + 1;
  return dict + ' '.repeat((64 - (unpadded % 64)) % 64) + '\n';
};

/** The standard sandbox: scenarios, a folder of someone's files, a plain file, a link, frames, a home. */
function makeSandbox(name: string): string {
  const dir = join(root, name);
  mkdirSync(dir);
  writeFileSync(join(dir, 'scenario.json'), validScenario);
  mkdirSync(join(dir, 'configs'));
  writeFileSync(join(dir, 'configs', 'layer.json'), validScenario);
  mkdirSync(join(dir, 'thesis'));
  writeFileSync(join(dir, 'thesis', 'thesis.tex'), '\\documentclass{article}\n');
  writeFileSync(join(dir, 'results.txt'), 'measured 4200 atoms\n');
  symlinkSync('thesis', join(dir, 'link-to-folder'));
  mkdirSync(join(dir, 'home'));
  writeFileSync(join(dir, 'home', '.profile'), 'export X=1\n');
  mkdirSync(join(dir, 'frames'));
  const f8 = (n: number) => new Uint8Array(new Float64Array(n).fill(1).buffer);
  writeFileSync(join(dir, 'frames', 'zero.npy'), npy(padded("{'descr': '<f8', 'fortran_order': False, 'shape': (16, 16), }"), new Uint8Array(16 * 16 * 8)));
  writeFileSync(join(dir, 'frames', 'negative-shape.npy'), npy(padded("{'descr': '<f8', 'fortran_order': False, 'shape': (-16, 16), }"), f8(256)));
  writeFileSync(join(dir, 'frames', 'word-shape.npy'), npy(padded("{'descr': '<f8', 'fortran_order': False, 'shape': (sixteen, 16), }"), f8(256)));
  writeFileSync(join(dir, 'frames', 'long-header.npy'), npy(padded("{'descr': '<f8', 'fortran_order': False, 'shape': (16, 16), }"), f8(256), 60018));
  writeFileSync(join(dir, 'frames', 'short-data.npy'), npy(padded("{'descr': '<f8', 'fortran_order': False, 'shape': (16, 16), }"), f8(200)));
  writeFileSync(join(dir, 'frames', 'fortran.npy'), npy(padded("{'descr': '<f8', 'fortran_order': True, 'shape': (16, 16), }"), f8(256)));
  writeFileSync(join(dir, 'frames', 'complex.npy'), npy(padded("{'descr': '<c16', 'fortran_order': False, 'shape': (16, 8), }"), f8(256)));
  writeFileSync(join(dir, 'frames', 'broken-dict.npy'), npy(padded("{'descr': '<f8', 'fortran_order': False 'shape': (16, 16), }"), f8(256)));
  writeFileSync(join(dir, 'frames', 'extra-key.npy'), npy(padded("{'descr': '<f8', 'fortran_order': False, 'shape': (16, 16), 'x': 1, }"), f8(256)));
  return dir;
}

interface HostileCase {
  title: string;
  argv: string[];
  /** what the message must name */
  names: RegExp;
  /** extra preparation inside the sandbox before the snapshot */
  setup?: (dir: string) => Promise<void> | void;
  /** the output folder of the case when it does not exist before (excluded from the snapshot) */
  newOut?: string;
  /** the message must be a single line */
  oneLine?: boolean;
  /** run as a child process of the built tool instead of in this process */
  child?: boolean;
}

const solve = (...args: string[]): string[] => ['solve', 'scenario.json', '--threads', '1', '--quiet', ...args];
const evolve = (...args: string[]): string[] => ['evolve', 'scenario.json', '--threads', '1', '--quiet', '--set', 'evolution={"duration":1}', ...args];
const scan = (...args: string[]): string[] => ['scan', 'scenario.json', '--threads', '1', '--quiet', '--out', 'new', ...args];
const compare = (image: string, ...args: string[]): string[] => ['compare', 'scenario.json', '--image', `frames/${image}`, '--pixel-sites', '1', '--counts-per-atom', '1', '--out', 'cmp', '--threads', '1', '--quiet', ...args];
const disorderScenario = JSON.stringify({
  name: 'hostile-ensemble',
  energyUnit: 'U',
  lattice: { shape: [6, 6] },
  hubbard: { hopping: 0.02 },
  trap: { coefficient: 0.01 },
  disorder: { kind: 'box', width: 0.3, seed: 'hostile' },
  particles: { chemicalPotential: 0.5 },
  truncation: { nmax: 4 },
});

const cases: HostileCase[] = [
  // --- data loss ---------------------------------------------------------------------
  { title: '--out names a folder of unrelated files', argv: solve('--out', 'thesis'), names: /--out thesis: the folder exists and was not written by tiercake.*--force/, child: true },
  { title: '--out names the folder that holds the scenario', argv: ['solve', 'configs/layer.json', '--threads', '1', '--quiet', '--out', 'configs'], names: /--out configs: holds configs\/layer\.json, an input of this run/, child: true },
  { title: '--out names an existing regular file', argv: solve('--out', 'results.txt'), names: /--out results\.txt: is a file, not a folder; tiercake never replaces a file/ },
  { title: '--out names a symbolic link to a folder', argv: solve('--out', 'link-to-folder'), names: /--out link-to-folder: is a symbolic link/ },
  { title: '--out .', argv: solve('--out', '.'), names: /--out \.: is the current folder/, child: true },
  { title: '--out names the home folder ($HOME expanded by the shell)', argv: solve('--out', 'home'), names: /--out home: is your home folder/, child: true },
  { title: '--out ~ that the shell did not expand', argv: solve('--out', '~'), names: /--out ~: the shell did not expand "~"/ },
  { title: '--out names a folder above the current one', argv: solve('--out', '..'), names: /--out \.\.: is the current folder or holds it/ },
  { title: '--out names the filesystem root', argv: solve('--out', '/'), names: /--out \/: is the root of the filesystem/ },
  { title: 'compare --out names the folder that holds the image', argv: compare('zero.npy').map((a) => (a === 'cmp' ? 'frames' : a)), names: /--out frames: holds frames\/zero\.npy, an input of this run/ },
  {
    title: 'a folder of ours with a file added by hand is not replaced',
    setup: async (dir) => {
      expect((await run(solve('--out', 'ours'), dir)).code).toBe(0);
      writeFileSync(join(dir, 'ours', 'notes.txt'), 'my notes\n');
    },
    argv: solve('--out', 'ours'),
    names: /--out ours: the folder exists and holds notes\.txt, which tiercake did not write/,
  },
  {
    title: 'a folder of ours holding a symbolic link is not replaced',
    setup: async (dir) => {
      expect((await run(solve('--out', 'ours'), dir)).code).toBe(0);
      symlinkSync('../thesis', join(dir, 'ours', 'images', 'sneaky'));
    },
    argv: solve('--out', 'ours'),
    names: /--out ours: the folder exists and holds images\/sneaky, a symbolic link/,
  },
  {
    title: 'a forged marker does not make a folder ours',
    setup: (dir) => {
      mkdirSync(join(dir, 'forged'));
      writeFileSync(join(dir, 'forged', '.tiercake-output.json'), '{"format": "something else"}');
      writeFileSync(join(dir, 'forged', 'data.csv'), '1,2\n');
    },
    argv: solve('--out', 'forged'),
    names: /--out forged: the folder exists and its \.tiercake-output\.json is not a tiercake marker/,
  },
  // --- silent acceptance ------------------------------------------------------------
  {
    title: 'duplicate keys in a scenario (two particles groups)',
    setup: (dir) => writeFileSync(join(dir, 'twice.json'), validScenario.replace('"particles": {', '"particles": { "atoms": 20 },\n  "particles": {')),
    argv: ['solve', 'twice.json', '--out', 'new', '--quiet'],
    newOut: 'new',
    names: /twice\.json: line 18, column 3: the key "particles" appears a second time in the same group \(first at line 17\)/,
  },
  { title: '--threads 0x10', argv: solve('--threads', '0x10', '--out', 'new'), newOut: 'new', names: /--threads: expected a whole number from 1 to 256, got "0x10"/, child: true },
  { title: '--threads 1e1', argv: solve('--threads', '1e1', '--out', 'new'), newOut: 'new', names: /--threads: expected a whole number from 1 to 256, got "1e1"/ },
  { title: '--threads 1.0', argv: solve('--threads', '1.0', '--out', 'new'), newOut: 'new', names: /--threads: expected a whole number .*got "1\.0"/ },
  { title: '--threads " 4"', argv: solve('--threads', ' 4', '--out', 'new'), newOut: 'new', names: /--threads: expected a whole number .*got " 4"/ },
  { title: '--threads +2', argv: solve('--threads', '+2', '--out', 'new'), newOut: 'new', names: /--threads: expected a whole number .*got "\+2"/ },
  { title: 'ensemble --realisations 0x10', argv: ['ensemble', 'scenario.json', '--realisations', '0x10', '--out', 'new'], newOut: 'new', names: /--realisations: expected a whole number from 1 to/ },
  { title: 'diagram --nmax 1e1', argv: ['diagram', '--nmax', '1e1', '--out', 'new'], newOut: 'new', names: /--nmax: expected a whole number from 2 to 40, got "1e1"/ },
  { title: 'diagram --zj-max 0x1', argv: ['diagram', '--zj-max', '0x1', '--out', 'new'], newOut: 'new', names: /--zj-max: expected a number above 0 and at most 10, got "0x1"/ },
  { title: 'diagram --kt Infinity', argv: ['diagram', '--kt', 'Infinity', '--out', 'new'], newOut: 'new', names: /--kt: expected a number from 0 to 100, got "Infinity"/ },
  { title: 'hubbard --wavelength-nm 1064nm', argv: ['hubbard', '--species', '87Rb', '--wavelength-nm', '1064nm', '--out', 'new'], newOut: 'new', names: /--wavelength-nm: expected the lattice wavelength in nm, a number above 0, got "1064nm"/ },
  {
    title: 'compare on a picture without its unit (issue 13: it was read as atoms and fitted 37x off)',
    argv: compare('zero.npy').filter((a, i, all) => a !== '--counts-per-atom' && all[i - 1] !== '--counts-per-atom'),
    newOut: 'cmp',
    names: /--counts-per-atom: the measured picture has no unit; give its detected counts per atom/,
    child: true,
  },
  { title: 'compare --absorption-frames with one frame', argv: ['compare', 'scenario.json', '--absorption-frames', 'frames/zero.npy', '--pixel-sites', '1', '--out', 'cmp', '--quiet'], newOut: 'cmp', names: /--absorption-frames: expected WITH_ATOMS,PROBE_ONLY\[,DARK\]/ },
  { title: 'compare --absorption-frames in dimensionless mode without a cross-section', argv: ['compare', 'scenario.json', '--absorption-frames', 'frames/zero.npy,frames/zero.npy', '--pixel-sites', '1', '--out', 'cmp', '--quiet'], newOut: 'cmp', names: /--cross-section: absorption frames need the resonant cross-section sigma0; in dimensionless mode/ },
  { title: 'compare --max-iterations 3.5', argv: compare('zero.npy', '--max-iterations', '3.5'), newOut: 'cmp', names: /--max-iterations: expected a whole number from 1 to 1000, got "3\.5"/ },
  { title: 'compare --pixel-sites 0x2', argv: compare('zero.npy').map((a, i, all) => (all[i - 1] === '--pixel-sites' ? '0x2' : a)), newOut: 'cmp', names: /--pixel-sites: expected the pixel size in lattice spacings, a number above 0, got "0x2"/ },
  { title: 'compare --pixel-um on a dimensionless scenario', argv: compare('zero.npy').map((a) => (a === '--pixel-sites' ? '--pixel-um' : a)), newOut: 'cmp', names: /--pixel-um: the scenario is dimensionless \(lengths in lattice spacings\); give the pixel size with --pixel-sites/ },
  { title: 'compare --bin-um on a dimensionless scenario', argv: compare('zero.npy', '--bin-um', '2'), newOut: 'cmp', names: /--bin-um: the scenario is dimensionless \(lengths in lattice spacings\); give the bin width with --bin-sites/ },
  { title: 'a .npy with a negative shape', argv: compare('negative-shape.npy'), newOut: 'cmp', names: /--image: frames\/negative-shape\.npy: the shape holds "-16"; every axis length must be a non-negative integer/ },
  { title: 'a .npy with a non-numeric shape', argv: compare('word-shape.npy'), newOut: 'cmp', names: /--image: frames\/word-shape\.npy: the shape holds "sixteen"; every axis length must be a non-negative integer/ },
  { title: 'a .npy shorter than its shape', argv: compare('short-data.npy'), newOut: 'cmp', names: /short-data\.npy: the header's shape \(16, 16\) of <f8 needs 2048 data bytes, the file holds 1600; the file is truncated/ },
  // Fortran order is read (by transposing into C order, NEP 1); this one holds a constant frame.
  { title: 'a .npy in Fortran order holding a constant frame', argv: compare('fortran.npy'), newOut: 'cmp', names: /--image: frames\/fortran\.npy holds no image: every pixel is 1/ },
  { title: 'a .npy of complex numbers', argv: compare('complex.npy'), newOut: 'cmp', names: /complex\.npy: dtype "<c16" is not supported \(use float64, float32 or an integer type\)/ },
  { title: 'a .npy with a broken header dict', argv: compare('broken-dict.npy'), newOut: 'cmp', names: /broken-dict\.npy: the header dict is malformed: expected ',' or '}' after a value/ },
  { title: 'a .npy header with an unknown key', argv: compare('extra-key.npy'), newOut: 'cmp', names: /extra-key\.npy: the header dict has the unknown key 'x' \(expected descr, fortran_order and shape\)/ },
  // evolve (issue 18): the same folder rules, its own option and section checks
  { title: 'evolve --out names a folder of unrelated files', argv: evolve('--out', 'thesis'), names: /--out thesis: the folder exists and was not written by tiercake.*--force/ },
  { title: 'evolve --modulation-frequencies 0x1:2:3', argv: evolve('--modulation-frequencies', '0x1:2:3', '--out', 'new'), newOut: 'new', names: /--modulation-frequencies \(from\): expected .*got "0x1"/ },
  { title: 'evolve: a ramp of the chemical potential', argv: evolve('--set', 'evolution.ramps=[{"path":"particles.chemicalPotential","points":[[0,1]]}]', '--out', 'new'), newOut: 'new', names: /evolution\.ramps\[0\]\.path: particles\.chemicalPotential cannot be ramped: a closed system conserves N/ },
  { title: 'evolve: a scenario without an evolution section', argv: ['evolve', 'scenario.json', '--quiet', '--out', 'new'], newOut: 'new', names: /evolution: scenario\.json has no "evolution" section/ },
  { title: 'evolve: a thermal start', argv: evolve('--set', 'temperature.kT=0.05', '--out', 'new'), newOut: 'new', names: /temperature: evolve starts from the T = 0 ground state; a thermal start is not supported/ },
  // --- were internal errors ---------------------------------------------------------
  { title: '--out under a regular file', argv: solve('--out', 'results.txt/run1'), names: /--out results\.txt\/run1: lies under .*results\.txt, which is a file, not a folder/ },
  { title: '--out under /dev/null', argv: solve('--out', '/dev/null/run1'), names: /--out \/dev\/null\/run1: lies under \/dev\/null, which is a device, not a folder/, child: true },
  { title: '--out /dev/null', argv: solve('--out', '/dev/null'), names: /--out \/dev\/null: is a device, not a folder/ },
  { title: 'an all-zero measured image', argv: compare('zero.npy'), newOut: 'cmp', names: /--image: frames\/zero\.npy holds no image: every pixel is 0/, child: true },
  { title: 'a .npy header length past the end of the file (compare)', argv: compare('long-header.npy'), newOut: 'cmp', names: /long-header\.npy: the \.npy header length 60018 runs past the end of the file \(2176 bytes\); the file is truncated or damaged/ },
  {
    title: 'a shard whose .npy header length runs past the end of the file (merge)',
    setup: async (dir) => {
      writeFileSync(join(dir, 'disorder.json'), disorderScenario);
      expect((await run(['ensemble', 'disorder.json', '--realisations', '2', '--block-size', '2', '--shard', '0/1', '--threads', '1', '--quiet', '--out', 'shards'], dir)).code).toBe(0);
      const file = join(dir, 'shards', 'shard-0-of-1', 'blocks', 'block-000000', 'density_mean.npy');
      const bytes = readFileSync(file);
      bytes[8] = 0x72;
      bytes[9] = 0xea; // header length 60018
      writeFileSync(file, bytes);
    },
    argv: ['merge', 'shards', '--out', 'merged', '--quiet'],
    newOut: 'merged',
    names: /merge ".*density_mean\.npy": the \.npy header length 60018 runs past the end of the file.*run it again/,
  },
  { title: '--set lattice.shape=[4,4', argv: solve('--set', 'lattice.shape=[4,4', '--out', 'new'), newOut: 'new', oneLine: true, names: /--set lattice\.shape=\[4,4: the value is not valid JSON at character 5 \(the value ends before the closing '\]'\)/ },
  // --- already held, kept -------------------------------------------------------------
  { title: 'a 2^31-site lattice is refused before allocating', argv: solve('--set', 'lattice.shape=[46341,46341]', '--out', 'new'), newOut: 'new', names: /lattice\.shape: 46341 x 46341 = \d+ sites needs about .* GiB/ },
  {
    title: 'a scenario over 1 MiB',
    setup: (dir) => writeFileSync(join(dir, 'big.json'), `{"name": "big", "description": "${'a'.repeat(1 << 20)}"}`),
    argv: ['solve', 'big.json', '--out', 'new'],
    newOut: 'new',
    names: /big\.json: \d+ bytes is too large for a scenario file/,
  },
  { title: '/dev/zero as the scenario', argv: ['solve', '/dev/zero', '--out', 'new'], newOut: 'new', names: /\/dev\/zero: not a regular file/ },
  { title: 'an unknown key, with the valid ones listed', argv: solve('--set', 'particles.atom=5', '--out', 'new'), newOut: 'new', names: /"particles\.atom" is not a scenario key; did you mean "particles\.atoms"\?/ },
  // --- scan, submit, progress ---------------------------------------------------------
  { title: 'scan --vary without values', argv: scan('--vary', 'hubbard.hopping'), newOut: 'new', names: /--vary "hubbard\.hopping": expected PATH=FROM:TO:COUNT or PATH=A,B,C/ },
  { title: 'scan --vary of a text', argv: scan('--vary', 'name=1,2'), newOut: 'new', names: /--vary name: the scenario holds a string there, not a number/, child: true },
  { title: 'scan --vary of a misspelt key', argv: scan('--vary', 'hubbard.hoping=0.01,0.02'), newOut: 'new', names: /"hubbard\.hoping" is not a scenario key; did you mean "hubbard\.hopping"\?/ },
  { title: 'scan --vary to a value the schema refuses, at a later point', argv: scan('--vary', 'hubbard.hopping=0.02,-0.01'), newOut: 'new', names: /scan point 1 \(hubbard\.hopping=-0\.01\): [\s\S]*hubbard\.hopping: expected a number > 0, got -0\.01/ },
  { title: 'scan --vary with a hex count', argv: scan('--vary', 'hubbard.hopping=0.01:0.02:0x3'), newOut: 'new', names: /--vary hubbard\.hopping \(COUNT\): expected a whole number from 1 to 100000, got "0x3"/ },
  { title: 'scan --fixed without the characteristic density', argv: scan('--vary', 'hubbard.hopping=0.01,0.02', '--fixed', 'atoms'), newOut: 'new', names: /--fixed: only used with --vary characteristicDensity/ },
  { title: 'scan --chain-length 0', argv: scan('--vary', 'hubbard.hopping=0.01,0.02', '--chain-length', '0'), newOut: 'new', names: /--chain-length: expected a whole number from 1 to 100000, got "0"/ },
  { title: 'submit without --shards', argv: ['submit', 'scenario.json', '--scan', '--vary', 'hubbard.hopping=0.01,0.02', '--dry-run', '--out', 'new'], newOut: 'new', names: /--shards: required/ },
  { title: 'submit --time in words', argv: ['submit', 'scenario.json', '--scan', '--vary', 'hubbard.hopping=0.01,0.02', '--shards', '2', '--time', 'two hours', '--out', 'new'], newOut: 'new', names: /--time: expected a SLURM time limit/ },
  { title: 'progress on a folder without shards', argv: ['progress', 'thesis'], names: /progress thesis: holds no submission \(submit\.json\) and no shard folders/ },
];

function checkMessage(r: Run, c: HostileCase): void {
  const context = `${c.title}\nstderr: ${r.stderr}\nstdout: ${r.stdout}`;
  expect(r.code, context).toBe(2);
  expect(r.stdout, context).toBe('');
  expect(r.stderr, context).toMatch(/^tiercake: /);
  expect(r.stderr, context).toMatch(c.names);
  const text = r.stderr.trimEnd();
  expect(text.split('\n').length, context).toBeLessThanOrEqual(c.oneLine ? 1 : MAX_LINES);
  expect(text.length, context).toBeLessThanOrEqual(MAX_CHARS);
  expect(text, context).not.toMatch(/\n\s+at |\bat .*:\d+:\d+|(?:Type|Range|Reference|Syntax)Error|internal error|ENOTDIR|ENOENT/);
}

describe('hostile inputs: exit 2, one paragraph naming the option or file, nothing outside the output folder changes', () => {
  it.each(cases.map((c, k) => [c.title, k] as const))('%s', async (_title, k) => {
    const c = cases[k];
    const dir = makeSandbox(`case-${k}`);
    await c.setup?.(dir);
    const before = snapshot(dir);
    const r = await (c.child ? runChild : runHere)(c.argv, dir);
    checkMessage(r, c);
    const after = snapshot(dir);
    if (c.newOut !== undefined) {
      expect(before.has(c.newOut)).toBe(false);
      expect(existsSync(join(dir, c.newOut)), `${c.title}: a refused run created its output folder`).toBe(false);
    }
    expect([...after.entries()], c.title).toEqual([...before.entries()]);
  });
});

describe('controls: the snapshot sees what tiercake writes', () => {
  it('a folder tiercake wrote is replaced, and its marker lists every file', async () => {
    const dir = makeSandbox('control-replace');
    expect((await run(solve('--out', 'ours'), dir)).code).toBe(0);
    const first = snapshot(dir);
    const marker = JSON.parse(readFileSync(join(dir, 'ours', '.tiercake-output.json'), 'utf8'));
    expect(marker.tool.name).toBe('tiercake');
    expect(marker.scenarioHash).toMatch(/^[0-9a-f]{64}$/);
    const written = [...first.entries()].filter(([p, kind]) => p.startsWith('ours/') && kind.startsWith('file') && !p.endsWith('.tiercake-output.json')).map(([p]) => p.slice(5));
    expect([...marker.files].sort()).toEqual(written.sort());
    expect((await run(solve('--out', 'ours', '--set', 'particles.chemicalPotential=1.3'), dir)).code).toBe(0);
    const second = snapshot(dir);
    expect(second.get('ours/fields/density.npy')).not.toBe(first.get('ours/fields/density.npy'));
    // Nothing else changed, and no staging folder was left.
    for (const [p, kind] of first) if (!p.startsWith('ours')) expect(second.get(p), p).toBe(kind);
    expect([...second.keys()].filter((p) => p.includes('.tmp-'))).toEqual([]);
  });

  it('--force moves a folder that is not ours aside and deletes nothing', async () => {
    const dir = makeSandbox('control-force');
    const before = snapshot(dir);
    const r = await run(solve('--out', 'thesis', '--force'), dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/was moved to .*thesis\.replaced-\d{8}T\d{6}/);
    const aside = readdirSync(dir).find((n) => n.startsWith('thesis.replaced-'));
    expect(aside).toBeDefined();
    expect(readFileSync(join(dir, aside as string, 'thesis.tex'), 'utf8')).toBe(before.has('thesis/thesis.tex') ? '\\documentclass{article}\n' : '');
    expect(existsSync(join(dir, 'thesis', '.tiercake-output.json'))).toBe(true);
  });

  it('--force never overrides the folders that are always refused', async () => {
    const dir = makeSandbox('control-force-refused');
    const before = snapshot(dir);
    for (const out of ['.', 'home', 'results.txt', 'link-to-folder', 'configs']) {
      const r = await run(['solve', 'configs/layer.json', '--threads', '1', '--quiet', '--force', '--out', out], dir);
      expect(r.code, `${out}: ${r.stderr}`).toBe(2);
    }
    expect([...snapshot(dir).entries()]).toEqual([...before.entries()]);
  });
});
