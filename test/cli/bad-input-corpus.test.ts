// The bad-input corpus (issue 8, item 6): malformed and hostile scenarios and command
// lines, each run through the real command-line entry point. Every one must fail the same
// clean way: exit code 2 (DESIGN.md section 6), one short paragraph on stderr that names
// the offending field or file, no stack trace or JavaScript error name, nothing on stdout,
// no control characters that could rewrite the terminal, and no output folder (nor a
// staging folder left behind).
//
// The scenario files are in test/bad-scenarios/ (one mistake each, on top of the valid
// _valid-small.json); files that are awkward to keep in git (binary, 100 000 levels of
// nesting, over 1 MiB, UTF-16, symbolic-link loops, bad landscape .npy and PNG files next to
// scenarios that name them by relative paths) are written by the test. Most cases
// run in this process through runCli; a handful run as child processes
// (`node --import test/register-ts.mjs src/main.ts ...`), which is how a user meets them.
//
// Two controls show that the checks can fail: the valid file solves (exit 0) and creates
// its output folder, and the same file with a UTF-8 byte order mark still validates.

import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { locateJsonProblem } from '../../src/scenario/loadScenario.js';
import { encodeGray16, encodeRgba8 } from '../../src/formats/pngCodec.js';

const repoRoot = fileURLToPath(new URL('../..', import.meta.url));
const corpusDir = fileURLToPath(new URL('../bad-scenarios/', import.meta.url));
const validFile = join(corpusDir, '_valid-small.json');
const registerTs = fileURLToPath(new URL('../register-ts.mjs', import.meta.url));

const readFileSyncUtf8 = (path: string): string => readFileSync(path, 'utf8');

/** The paragraph limits of the brief: a few lines a user reads at once. */
const MAX_LINES = 6;
const MAX_CHARS = 800;

interface CliResult {
  code: number;
  stdout: string;
  stderr: string;
}

interface BadCase {
  title: string;
  /** command line without --out (caseDir: an empty folder of this case) */
  args: (caseDir: string) => string[];
  /** what the message must name: the field path or the file */
  names: RegExp;
  /** append --out <caseDir>/out (solve only) */
  withOut?: boolean;
  /** run as a child process instead of in this process */
  child?: boolean;
  /** the fix lies outside the scenario loader; the case is expected to fail until then */
  pending?: string;
}

// --- every file in test/bad-scenarios/ and what its message must name -------------------

const fileCases: Record<string, { names: RegExp; pending?: string }> = {
  // not a JSON object at all
  'empty.json': { names: /empty\.json: the file is empty/ },
  'whitespace-only.json': { names: /whitespace-only\.json: .*blank space/ },
  'yaml-not-json.json': { names: /yaml-not-json\.json: not valid JSON at line 1, column 1: .*does not start with "\{"/ },
  'trailing-comma.json': { names: /trailing-comma\.json: not valid JSON at line 19, column 4: a comma before '\}'/ },
  'single-quotes.json': { names: /single-quotes\.json: not valid JSON at line 1, column 3: single quotes/ },
  'comment-lines.json': { names: /comment-lines\.json: not valid JSON at line 2, column 3: comments are not allowed/ },
  'truncated-file.json': { names: /truncated-file\.json: not valid JSON at line 9, column 17/ },
  'json-list.json': { names: /json-list\.json: expected a JSON object .*got a list/ },
  'json-number.json': { names: /json-number\.json: expected a JSON object .*got the number 42/ },
  'json-string.json': { names: /json-string\.json: expected a JSON object .*got the string/ },
  'json-null.json': { names: /json-null\.json: expected a JSON object .*got null/ },
  'json-true.json': { names: /json-true\.json: expected a JSON object .*got the boolean true/ },
  // valid JSON, but a second group of the same name would silently replace the first
  'duplicate-key.json': { names: /duplicate-key\.json: line 20, column 3: the key "particles" appears a second time in the same group \(first at line 17\)/ },
  // NaN and Infinity written into the file
  'nan-token.json': { names: /nan-token\.json: not valid JSON at line 18, column 26: NaN is not a number in JSON/ },
  'infinity-token.json': { names: /infinity-token\.json: not valid JSON at line 12, column 16: Infinity is not a number in JSON/ },
  'number-overflow.json': { names: /particles\.chemicalPotential: expected a finite number, got Infinity/ },
  // wrong types
  'shape-string.json': { names: /lattice\.shape: expected a list \[\.\.\.\], got the text "8x8"/ },
  'shape-object.json': { names: /lattice\.shape: expected a list \[\.\.\.\], got \{"x":8,"y":8\}/ },
  'shape-fraction.json': { names: /lattice\.shape\[0\]: expected an integer, got 8\.5/ },
  'lattice-list.json': { names: /lattice: expected a group of keys \{\.\.\.\}, got the list \[8,8\]/ },
  'atoms-string.json': { names: /particles\.atoms: expected a number, got the text "5000"/ },
  'accelerate-string.json': { names: /solver\.accelerate: expected true or false, got the text "yes"/ },
  'stiffness-number.json': { names: /solver\.stiffness: expected true or false, got 1/ },
  'nmax-fraction.json': { names: /truncation\.nmax: expected an integer, got 3\.5/ },
  'name-number.json': { names: /name: expected a text in double quotes, got 12/ },
  'trap-null.json': { names: /trap: expected a group of keys \{\.\.\.\}, got null/ },
  // sizes and ranges
  'shape-negative.json': { names: /lattice\.shape\[0\]: expected an integer >= 1, got -8/ },
  'shape-zero.json': { names: /lattice\.shape\[0\]: expected an integer >= 1, got 0/ },
  'shape-empty.json': { names: /lattice\.shape: expected at least 1 entry/ },
  'shape-four-axes.json': { names: /lattice\.shape: expected at most 3 entries/ },
  'shape-axis-too-long.json': { names: /lattice\.shape\[0\]: expected an integer <= 100000, got 1000000/ },
  'shape-huge.json': { names: /lattice\.shape: 100000 x 100000 x 100000 .*GiB/ },
  'periodic-odd-length.json': { names: /shape\[0\]: a periodic axis needs an even length/ },
  'hopping-negative.json': { names: /hubbard\.hopping: expected a number > 0, got -0\.02/ },
  'kt-negative.json': { names: /temperature\.kT: expected a number >= 0, got -0\.1/ },
  'nmax-zero.json': { names: /truncation\.nmax: expected an integer >= 1, got 0/ },
  'stiffness-with-cluster.json': { names: /solver\.stiffness: the twisted solves behind the superfluid fraction are single-site/ },
  'cluster-wrong-length.json': { names: /solver\.cluster: expected 2 extents \(one per lattice axis\), got 3/ },
  'cluster-not-dividing-periodic.json': { names: /solver\.cluster\[0\]: on a periodic axis the cluster extent must divide the length 8, got 3/ },
  'cluster-too-many-states.json': { names: /solver\.cluster: a \[4, 4\] cluster at truncation\.nmax 3 has 4\.29e\+9 Fock states.*smaller cluster/ },
  'tolerance-zero.json': { names: /solver\.tolerance: expected a number > 0, got 0/ },
  'energy-unit-unknown.json': { names: /energyUnit: expected one of "J", "U", "Hz", "kHz", "nK", got the text "meV"/ },
  'energy-unit-nk-in-hubbard.json': { names: /energyUnit: .*must be J or U, got nK/ },
  'hopping-not-one-in-j-units.json': { names: /hubbard\.hopping: with energyUnit J the hopping is 1 by definition/ },
  // missing fields
  'missing-lattice.json': { names: /lattice: missing; expected a group of keys/ },
  'missing-particles.json': { names: /particles: missing; expected a group of keys/ },
  'missing-name.json': { names: /name: missing; expected a text/ },
  'missing-interaction-in-j-units.json': { names: /hubbard\.interaction: required when energyUnit is J/ },
  // unknown keys: a typo of a real key must suggest it
  'typo-top-level.json': { names: /latice: unknown key; did you mean "lattice"\?/ },
  'typo-nested.json': { names: /particles\.atom: unknown key; did you mean "atoms"\?/ },
  'typo-case.json': { names: /truncation\.nMax: unknown key; did you mean "nmax"\?/ },
  'typo-hopping.json': { names: /hubbard\.hoping: unknown key; did you mean "hopping"\?/ },
  'misplaced-key.json': { names: /atoms: unknown key here; "atoms" belongs in "particles\.atoms"/ },
  'unknown-key-unrelated.json': { names: /colourScheme: unknown key; valid keys here: name, .*lattice/ },
  'unknown-key-escape-sequence.json': { names: /\["\\u001b\[2J.*: unknown key/ },
  'unknown-key-very-long.json': { names: /k{30,}\.\.\.: unknown key/ },
  'proto-key.json': { names: /__proto__: unknown key/ },
  // groups that exclude or need each other
  'hubbard-and-laboratory.json': { names: /hubbard: give exactly one of "hubbard" .* and "laboratory"/ },
  'neither-hubbard-nor-laboratory.json': { names: /hubbard: give exactly one of "hubbard" .* and "laboratory"/ },
  'atoms-and-chemical-potential.json': { names: /particles: give exactly one of particles\.atoms and particles\.chemicalPotential/ },
  'particles-empty.json': { names: /particles: give exactly one of particles\.atoms and particles\.chemicalPotential/ },
  'temperature-two-given.json': { names: /temperature: give at most one of kT, nanokelvin and entropyPerAtom/ },
  'entropy-without-atoms.json': { names: /temperature\.entropyPerAtom: .*give particles\.atoms/ },
  // physically inconsistent
  'nmax-below-filling.json': { names: /truncation\.nmax: .*about 5 atoms per site .*nmax = 2/ },
  'atoms-over-capacity.json': { names: /particles\.atoms: 1000 atoms cannot fit on 64 sites/ },
  'atoms-astronomical.json': { names: /particles\.atoms: 1e\+300 atoms cannot fit/ },
  'chemical-potential-beyond-nmax-ceiling.json': {
    names: /truncation\.nmax|particles\.chemicalPotential/,
  },
  // per-axis lists of the wrong length
  'boundary-wrong-length.json': { names: /lattice\.boundary: expected one value or 2 \(one per lattice axis\), got 3/ },
  'hopping-wrong-length.json': { names: /hubbard\.hopping: expected one value or 2 \(one per lattice axis\), got 3/ },
  'trap-centre-wrong-length.json': { names: /trap\.centreSites: expected 2 coordinates/ },
  'trap-frequency-in-hubbard-mode.json': { names: /trap\.frequencyHz: needs laboratory mode/ },
  // laboratory mode
  'lab-missing-transverse.json': { names: /laboratory\.transverse: a 2D lattice needs the confinement/ },
  'lab-depth-wrong-length.json': { names: /laboratory\.depthEr: expected one value or 2/ },
  'lab-wavelength-zero.json': { names: /laboratory\.wavelengthNm: expected a number > 0, got 0/ },
  'lab-unknown-species.json': { names: /species: unknown species "87Rbb"/ },
  'lab-species-hostile.json': {
    names: /species/,
  },
  // disorder (a discriminated union on "kind")
  'disorder-typo.json': { names: /disorder\.widht: unknown key; did you mean "width"\?/ },
  'disorder-unknown-kind.json': { names: /disorder\.kind: expected one of "box", "speckle", got the text "gaussian"/ },
  'disorder-missing-kind.json': { names: /disorder\.kind: missing; expected one of "box", "speckle"/ },
  'disorder-negative-width.json': { names: /disorder\.width: expected a number >= 0, got -0\.2/ },
  // landscape terms (issue 16): the schema's checks and a file that is not there
  'landscape-missing-file.json': { names: /landscape\[0\]\.file: file not found: .*no-such-potential\.npy \(paths are relative to the scenario file\)/ },
  'landscape-sites-not-npy.json': { names: /landscape\[0\]\.file: expected an \.npy file of per-site energies/ },
  'landscape-png-without-scale.json': { names: /landscape\[0\]\.energyPerLevel: required for a PNG picture/ },
  'landscape-unknown-kind.json': { names: /landscape\[0\]\.kind: expected one of "sites", "image", "gradient", "box", "superlattice", got the text "lens"/ },
  'landscape-box-missing-radius.json': { names: /landscape\[0\]\.radius: required for shape "disc"/ },
  'landscape-gradient-direction-length.json': { names: /landscape\[0\]\.direction: expected 2 components \(one per lattice axis\), got 3/ },
  'landscape-combined-in-hubbard.json': { names: /landscape\[0\]\.tunnelling: tunnelling "combined" needs laboratory mode/ },
  // hostile strings and nesting
  'name-path-traversal.json': { names: /name: letters, digits.*got the text "\.\.\/\.\.\/etc\/passwd"/ },
  'name-very-long.json': { names: /name: letters, digits.*got the text "x+\.\.\./ },
  'description-too-long.json': { names: /description: expected at most 2000 characters/ },
  'deeply-nested.json': { names: /deeply-nested\.json: lists and groups nested more than \d+ levels deep at lattice\.shape\[0\]/ },
  'everything-wrong.json': { names: /hubard: unknown key; did you mean "hubbard"\?[^]*and \d+ more problems/ },
};

// --- files written by the test ----------------------------------------------------------

let scratch = '';
const generated: Record<string, string> = {};

/** Deterministic bytes (xorshift32, Marsaglia, J. Stat. Softw. 8 (14), 2003) for the garbage file. */
function garbageBytes(count: number, seed: number): Uint8Array {
  const out = new Uint8Array(count);
  let x = seed >>> 0 || 1;
  for (let k = 0; k < count; k++) {
    x ^= x << 13;
    x >>>= 0;
    x ^= x >>> 17;
    x ^= x << 5;
    x >>>= 0;
    out[k] = x & 0xff;
  }
  out[3] = 0; // at least one NUL, as in any real binary file
  return out;
}

function writeGenerated(): void {
  const dir = join(scratch, 'generated');
  mkdirSync(dir);
  const put = (name: string, data: string | Uint8Array): void => {
    generated[name] = join(dir, name);
    writeFileSync(generated[name], data);
  };
  const valid = JSON.stringify({
    name: 'corpus-case',
    energyUnit: 'U',
    lattice: { shape: [8, 8] },
    hubbard: { hopping: 0.02 },
    particles: { chemicalPotential: 0.5 },
  });
  put('binary-garbage.json', garbageBytes(4096, 20240611));
  put('camera-frame.png', Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), garbageBytes(256, 7)]));
  put('density.npy', Buffer.concat([Buffer.from([0x93]), Buffer.from("NUMPY\x01\x00v\x00{'descr': '<f8', 'fortran_order': False, 'shape': (8, 8), }", 'latin1'), garbageBytes(512, 3)]));
  put('utf16.json', Buffer.from(`\ufeff${valid}`, 'utf16le'));
  put('latin1.json', Buffer.concat([Buffer.from('{"name": "corpus-case", "description": "Caf', 'latin1'), Buffer.from([0xe9]), Buffer.from('", "lattice": {"shape": [8]}}')]));
  put('deep-100000.json', `{"name": "deep", "lattice": {"shape": ${'['.repeat(100_000)}${']'.repeat(100_000)}}}`);
  put('too-large.json', `{"name": "big", "description": "${'a'.repeat(1 << 20)}"}`);
  put('with-bom.json', `\ufeff${valid}`);
  put('evil\u001b[2J.json', 'not a scenario');
  const loopA = join(dir, 'loop-a.json');
  const loopB = join(dir, 'loop-b.json');
  symlinkSync(loopB, loopA);
  symlinkSync(loopA, loopB);
  generated['loop-a.json'] = loopA;
  mkdirSync(join(dir, 'a-folder.json'));
  generated['a-folder.json'] = join(dir, 'a-folder.json');
  writeLandscapeFiles(dir, put);
}

// --- bad landscape files (issue 16): each next to a scenario that names it by a relative path --

/** A .npy file with a hand-written header (NEP 1, version 1.0) and raw little-endian data. */
function npyBytes(header: string, data: Uint8Array): Uint8Array {
  let h = header;
  h += ' '.repeat((64 - ((10 + h.length + 1) % 64)) % 64) + '\n';
  return Buffer.concat([Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0, h.length & 0xff, h.length >> 8]), Buffer.from(h, 'latin1'), data]);
}

function float64Bytes(values: number[]): Uint8Array {
  return new Uint8Array(Float64Array.from(values).buffer);
}

const landscapeFiles: Record<string, { term: Record<string, unknown>; file: string; bytes: (() => Uint8Array) | 'folder' }> = {
  'landscape-wrong-shape': {
    term: { kind: 'sites', file: 'wrong-shape.npy' },
    file: 'wrong-shape.npy',
    bytes: () => npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (8, 9), }", float64Bytes(Array(72).fill(0))),
  },
  'landscape-nan': {
    term: { kind: 'sites', file: 'with-nan.npy' },
    file: 'with-nan.npy',
    bytes: () => npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (8, 8), }", float64Bytes(Array.from({ length: 64 }, (_, i) => (i === 2 * 8 + 5 ? Number.NaN : i === 40 ? Infinity : 0.1)))),
  },
  'landscape-complex-dtype': {
    term: { kind: 'sites', file: 'complex.npy' },
    file: 'complex.npy',
    bytes: () => npyBytes("{'descr': '<c16', 'fortran_order': False, 'shape': (8, 8), }", new Uint8Array(64 * 16)),
  },
  'landscape-fortran-order': {
    term: { kind: 'sites', file: 'fortran.npy' },
    file: 'fortran.npy',
    bytes: () => npyBytes("{'descr': '<f8', 'fortran_order': True, 'shape': (8, 8), }", float64Bytes(Array(64).fill(0))),
  },
  'landscape-truncated': {
    term: { kind: 'sites', file: 'truncated.npy' },
    file: 'truncated.npy',
    bytes: () => npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (8, 8), }", float64Bytes(Array(40).fill(0))),
  },
  'landscape-not-npy': { term: { kind: 'sites', file: 'garbage.npy' }, file: 'garbage.npy', bytes: () => garbageBytes(600, 11) },
  'landscape-empty-file': { term: { kind: 'sites', file: 'empty.npy' }, file: 'empty.npy', bytes: () => new Uint8Array(0) },
  'landscape-folder': { term: { kind: 'sites', file: 'a-folder.npy' }, file: 'a-folder.npy', bytes: 'folder' },
  'landscape-image-3d': {
    term: { kind: 'image', file: 'cube.npy', pixelSize: 1 },
    file: 'cube.npy',
    bytes: () => npyBytes("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 2, 2), }", float64Bytes(Array(8).fill(1))),
  },
  'landscape-image-nan': {
    term: { kind: 'image', file: 'picture-nan.npy', pixelSize: 1 },
    file: 'picture-nan.npy',
    bytes: () => npyBytes("{'descr': '<f4', 'fortran_order': False, 'shape': (3, 4), }", new Uint8Array(Float32Array.from([0, 0, 0, 0, 0, 0, Number.NaN, 0, 0, 0, 0, 0]).buffer)),
  },
  'landscape-image-colour': {
    term: { kind: 'image', file: 'colour.png', pixelSize: 1, energyPerLevel: 0.001 },
    file: 'colour.png',
    bytes: () => encodeRgba8(4, 3, new Uint8Array(4 * 3 * 4).fill(200)),
  },
  'landscape-image-damaged-png': {
    term: { kind: 'image', file: 'damaged.png', pixelSize: 1, energyPerLevel: 0.001 },
    file: 'damaged.png',
    bytes: () => Buffer.concat([Buffer.from(encodeGray16(4, 3, new Uint16Array(12))).subarray(0, 40), garbageBytes(30, 5)]),
  },
};

function writeLandscapeFiles(dir: string, put: (name: string, data: string | Uint8Array) => void): void {
  const base = JSON.parse(readFileSyncUtf8(validFile)) as Record<string, unknown>;
  for (const [name, c] of Object.entries(landscapeFiles)) {
    if (c.bytes === 'folder') mkdirSync(join(dir, c.file));
    else writeFileSync(join(dir, c.file), c.bytes());
    put(`${name}.json`, JSON.stringify({ ...base, landscape: [c.term] }));
  }
}

const solveFile = (name: () => string, ...extra: string[]) => () => ['solve', name(), ...extra];
const gen = (name: string) => () => generated[name];
const valid = () => validFile;
const set = (...items: string[]) => solveFile(valid, ...items.flatMap((item) => ['--set', item]));

const otherCases: BadCase[] = [
  // --set values that start like JSON must be JSON
  { title: '--set an unclosed list', args: set('lattice.shape=[4,4'), names: /--set lattice\.shape=\[4,4: the value is not valid JSON at character 5/, withOut: true },
  { title: '--set a group with a key twice', args: set('particles={"atoms":1,"atoms":2}'), names: /--set particles=.*the key "atoms" appears a second time/, withOut: true },
  // files that are not scenario files at all
  { title: 'binary garbage', args: solveFile(gen('binary-garbage.json')), names: /binary-garbage\.json: the file contains binary data/, withOut: true, child: true },
  { title: 'a PNG image', args: solveFile(gen('camera-frame.png')), names: /camera-frame\.png: .*looks like a PNG image/, withOut: true, child: true },
  { title: 'a .npy output', args: solveFile(gen('density.npy')), names: /density\.npy: .*looks like a NumPy \.npy array/, withOut: true },
  { title: 'UTF-16 text', args: solveFile(gen('utf16.json')), names: /utf16\.json: the file is saved as UTF-16/, withOut: true, child: true },
  { title: 'Latin-1 text', args: solveFile(gen('latin1.json')), names: /latin1\.json: not UTF-8 text \(invalid byte at line 1, column 44\)/, withOut: true },
  { title: '100 000 levels of nesting', args: solveFile(gen('deep-100000.json')), names: /deep-100000\.json: lists and groups nested more than/, withOut: true, child: true },
  { title: 'a file over 1 MiB', args: solveFile(gen('too-large.json')), names: /too-large\.json: \d+ bytes is too large/, withOut: true },
  { title: 'a file name with an escape sequence', args: solveFile(gen('evil\u001b[2J.json')), names: /evil\\u001b\[2J\.json: not valid JSON/, withOut: true },
  { title: 'a loop of symbolic links', args: solveFile(gen('loop-a.json')), names: /loop-a\.json: the path is a loop of symbolic links/, withOut: true },
  { title: 'a folder', args: solveFile(gen('a-folder.json')), names: /a-folder\.json: is a folder, not a file/, withOut: true, child: true },
  { title: 'a path that does not exist', args: solveFile(() => join(scratch, 'no-such-folder', 'scenario.json')), names: /no-such-folder\/scenario\.json: file not found/, withOut: true, child: true },
  { title: 'a path through a file', args: solveFile(() => join(validFile, 'inner.json')), names: /_valid-small\.json\/inner\.json: file not found/, withOut: true },
  { title: 'an empty path', args: solveFile(() => ''), names: /scenario: the path is empty/, withOut: true },
  { title: 'a device', args: solveFile(() => '/dev/null'), names: /\/dev\/null: not a regular file/, withOut: true },
  // landscape files that cannot be used (written by the test next to their scenario)
  { title: 'landscape: .npy of the wrong shape', args: solveFile(gen('landscape-wrong-shape.json')), names: /landscape\[0\]\.file: wrong-shape\.npy has shape \(8, 9\), the lattice \(8, 8\)/, withOut: true },
  { title: 'landscape: .npy holding NaN and Infinity', args: solveFile(gen('landscape-nan.json')), names: /landscape\[0\]\.file: with-nan\.npy holds 2 values that are NaN or infinite \(first at index \(2, 5\)\)/, withOut: true, child: true },
  { title: 'landscape: complex dtype', args: solveFile(gen('landscape-complex-dtype.json')), names: /landscape\[0\]\.file: complex\.npy: .*dtype \"<c16\" is not supported/, withOut: true },
  { title: 'landscape: Fortran order', args: solveFile(gen('landscape-fortran-order.json')), names: /landscape\[0\]\.file: fortran\.npy: .*Fortran order/, withOut: true },
  { title: 'landscape: truncated data', args: solveFile(gen('landscape-truncated.json')), names: /landscape\[0\]\.file: truncated\.npy: .*the file is truncated/, withOut: true },
  { title: 'landscape: not an .npy at all', args: solveFile(gen('landscape-not-npy.json')), names: /landscape\[0\]\.file: garbage\.npy: .*not a NumPy \.npy file/, withOut: true },
  { title: 'landscape: an empty file', args: solveFile(gen('landscape-empty-file.json')), names: /landscape\[0\]\.file: .*empty\.npy is empty/, withOut: true },
  { title: 'landscape: a folder', args: solveFile(gen('landscape-folder.json')), names: /landscape\[0\]\.file: .*a-folder\.npy is a folder, not a file/, withOut: true },
  { title: 'landscape: a 3D picture', args: solveFile(gen('landscape-image-3d.json')), names: /landscape\[0\]\.file: cube\.npy has shape \(2, 2, 2\); a picture needs a 2D array/, withOut: true },
  { title: 'landscape: a picture holding NaN', args: solveFile(gen('landscape-image-nan.json')), names: /landscape\[0\]\.file: picture-nan\.npy holds 1 value that is NaN or infinite \(first at index \(1, 2\)\)/, withOut: true },
  { title: 'landscape: a colour PNG', args: solveFile(gen('landscape-image-colour.json')), names: /landscape\[0\]\.file: colour\.png is a colour PNG; save the picture as greyscale/, withOut: true, child: true },
  { title: 'landscape: a damaged PNG', args: solveFile(gen('landscape-image-damaged-png.json')), names: /landscape\[0\]\.file: damaged\.png: the file is damaged or unsupported/, withOut: true },
  { title: 'check: landscape file of the wrong shape', args: () => ['check', generated['landscape-wrong-shape.json']], names: /landscape\[0\]\.file: wrong-shape\.npy has shape \(8, 9\)/ },
  // --set: NaN and Infinity, bad syntax, bad paths
  { title: '--set NaN', args: set('particles.chemicalPotential=NaN'), names: /--set particles\.chemicalPotential=NaN: NaN is not allowed/, withOut: true, child: true },
  { title: '--set Infinity', args: set('particles.chemicalPotential=Infinity'), names: /--set particles\.chemicalPotential=Infinity: Infinity is not allowed/, withOut: true },
  { title: '--set -inf', args: set('hubbard.hopping=-inf'), names: /--set hubbard\.hopping=-inf: -inf is not allowed/, withOut: true },
  { title: '--set 1e999', args: set('particles.chemicalPotential=1e999'), names: /--set particles\.chemicalPotential=1e999: 1e999 is too large/, withOut: true },
  { title: '--set a list holding 1e999', args: set('lattice.shape=[1e999,8]'), names: /lattice\.shape\[0\]: expected a finite number, got Infinity/, withOut: true },
  { title: '--set without "="', args: set('particles.atoms'), names: /--set particles\.atoms: expected path=value/, withOut: true },
  { title: '--set without a path', args: set('=5'), names: /--set =5: expected path=value/, withOut: true },
  { title: '--set with an empty segment', args: set('particles..atoms=5'), names: /--set particles\.\.atoms=5: empty segment/, withOut: true },
  { title: '--set unknown top-level key', args: set('particle.atoms=5'), names: /"particle" is not a scenario key; did you mean "particles"\?/, withOut: true },
  { title: '--set unknown nested key', args: set('particles.atom=5'), names: /"particles\.atom" is not a scenario key; did you mean "particles\.atoms"\?/, withOut: true },
  { title: '--set path into a number', args: set('particles.chemicalPotential.value=1'), names: /"particles\.chemicalPotential" holds a number \(0\.5\)/, withOut: true },
  { title: '--set path into a text', args: set('name.length=3'), names: /"name" holds a text/, withOut: true },
  { title: '--set path into a list element', args: set('lattice.shape.0.x=1'), names: /"lattice\.shape\.0" holds a number \(8\)/, withOut: true },
  { title: '--set a key inside a list', args: set('lattice.shape.x=3'), names: /"lattice\.shape" is a list with 2 entries/, withOut: true },
  { title: '--set __proto__ inside a list', args: set('lattice.shape.__proto__.polluted=1'), names: /"lattice\.shape" is a list with 2 entries/, withOut: true },
  { title: '--set constructor.prototype', args: set('constructor.prototype.polluted=1'), names: /"constructor" is not a scenario key/, withOut: true },
  { title: '--set a negative index', args: set('lattice.shape.-1=3'), names: /"lattice\.shape" is a list with 2 entries/, withOut: true },
  { title: '--set an index far past the end', args: set('lattice.shape.99999999=3'), names: /"lattice\.shape" is a list with 2 entries/, withOut: true },
  { title: '--set a non-number', args: set('truncation.nmax=abc'), names: /truncation\.nmax: expected an integer, got the text "abc"/, withOut: true },
  { title: '--set an empty value', args: set('particles.chemicalPotential='), names: /particles\.chemicalPotential: expected a number, got the text ""/, withOut: true },
  { title: '--set a huge lattice', args: set('lattice.shape=[100000,100000]'), names: /lattice\.shape: 100000 x 100000 .*GiB/, withOut: true, child: true },
  { title: '--set a very long key', args: set(`${'x'.repeat(3000)}=1`), names: /--set x+\.\.\.x+=1: "x+\.\.\.x+" is not a scenario key/, withOut: true },
  // --threads
  { title: '--threads 0', args: solveFile(valid, '--threads', '0'), names: /--threads: expected a whole number from 1 to 256, got "0"/, withOut: true, child: true },
  { title: '--threads -1', args: solveFile(valid, '--threads', '-1'), names: /--threads: expected a whole number .*got "-1"/, withOut: true },
  { title: '--threads abc', args: solveFile(valid, '--threads', 'abc'), names: /--threads: expected a whole number .*got "abc"/, withOut: true },
  { title: '--threads 1.5', args: solveFile(valid, '--threads', '1.5'), names: /--threads: expected a whole number .*got "1\.5"/, withOut: true },
  { title: '--threads 1e9', args: solveFile(valid, '--threads', '1e9'), names: /--threads: expected a whole number .*got "1e9"/, withOut: true },
  { title: '--threads empty', args: solveFile(valid, '--threads', ''), names: /--threads: expected a whole number/, withOut: true },
  { title: '--threads without a value', args: (caseDir) => ['solve', validFile, '--out', join(caseDir, 'out'), '--threads'], names: /--threads <n>' argument missing/ },
  // the command line itself
  { title: 'no scenario argument', args: () => ['solve'], names: /missing required argument 'scenario'/ },
  { title: 'a misspelt option', args: solveFile(valid, '--sett', 'particles.atoms=5'), names: /unknown option '--sett'/, withOut: true },
  // `check` refuses the same inputs
  { title: 'check: a typo', args: () => ['check', join(corpusDir, 'typo-nested.json')], names: /particles\.atom: unknown key; did you mean "atoms"\?/ },
  { title: 'check: a huge lattice', args: () => ['check', join(corpusDir, 'shape-huge.json')], names: /lattice\.shape: .*GiB/ },
  { title: 'check: --set NaN', args: () => ['check', validFile, '--set', 'particles.atoms=NaN'], names: /--set particles\.atoms=NaN: NaN is not allowed/ },
];

const cases: BadCase[] = [
  ...Object.entries(fileCases).map(([file, c]) => ({
    title: `file ${file}`,
    args: () => ['solve', join(corpusDir, file)],
    names: c.names,
    withOut: true,
    ...(c.pending ? { pending: c.pending } : {}),
  })),
  ...otherCases,
];

// --- running the command line -----------------------------------------------------------

async function runInProcess(argv: string[]): Promise<CliResult> {
  let stdout = '';
  let stderr = '';
  const capture = (sink: (s: string) => void) =>
    ((chunk: string | Uint8Array, ...rest: unknown[]) => {
      sink(typeof chunk === 'string' ? chunk : Buffer.from(chunk).toString('utf8'));
      const done = rest.find((r) => typeof r === 'function') as (() => void) | undefined;
      done?.();
      return true;
    }) as typeof process.stdout.write;
  const out = vi.spyOn(process.stdout, 'write').mockImplementation(capture((s) => (stdout += s)));
  const err = vi.spyOn(process.stderr, 'write').mockImplementation(capture((s) => (stderr += s)));
  try {
    const code = await runCli(argv);
    return { code, stdout, stderr };
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}

function runChild(argv: string[]): Promise<CliResult> {
  return new Promise((resolve, reject) => {
    const env: NodeJS.ProcessEnv = { ...process.env, NO_COLOR: '1' };
    delete env.TIERCAKE_DEBUG;
    const child = spawn(process.execPath, ['--import', registerTs, 'src/main.ts', ...argv], { cwd: repoRoot, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString('utf8')));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString('utf8')));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code: code ?? -1, stdout, stderr }));
  });
}

interface Prepared {
  caseDir: string;
  argv: string[];
}

function prepare(c: BadCase, index: number): Prepared {
  const caseDir = join(scratch, `case-${index}`);
  mkdirSync(caseDir);
  const argv = c.args(caseDir);
  if (c.withOut) argv.push('--out', join(caseDir, 'out'));
  return { caseDir, argv };
}

/** The contract every case must meet. */
function expectCleanFailure(r: CliResult, c: BadCase, caseDir: string): void {
  const text = r.stderr.trimEnd();
  const context = `${c.title}\n--- stderr ---\n${r.stderr}\n--- stdout ---\n${r.stdout}`;
  expect(r.code, context).toBe(2);
  expect(r.stdout, context).toBe('');
  expect(text.length, context).toBeGreaterThan(0);
  expect(text.length, context).toBeLessThanOrEqual(MAX_CHARS);
  expect(text.split('\n').length, context).toBeLessThanOrEqual(MAX_LINES);
  expect(text, context).not.toMatch(/^\s+at /m);
  expect(text, context).not.toMatch(/\b(TypeError|ReferenceError|RangeError|SyntaxError)\b|Maximum call stack/);
  expect(text, context).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f-\u009f]/);
  expect(text, context).toMatch(c.names);
  // no output folder, and no staging folder (.out.tmp-*) left beside it
  expect(existsSync(join(caseDir, 'out')), context).toBe(false);
  expect(readdirSync(caseDir), context).toEqual([]);
}

// --- the tests ----------------------------------------------------------------------------

let savedDebug: string | undefined;
const childResults = new Map<BadCase, { result: CliResult; caseDir: string }>();

beforeAll(async () => {
  scratch = mkdtempSync(join(tmpdir(), 'tiercake-bad-input-'));
  savedDebug = process.env.TIERCAKE_DEBUG;
  delete process.env.TIERCAKE_DEBUG;
  writeGenerated();
  // child processes in batches of 4: each costs about a second of start-up
  const childCases = cases.filter((c) => c.child);
  const prepared = childCases.map((c) => ({ c, p: prepare(c, cases.indexOf(c)) }));
  for (let k = 0; k < prepared.length; k += 4) {
    const batch = prepared.slice(k, k + 4);
    const results = await Promise.all(batch.map(({ p }) => runChild(p.argv)));
    batch.forEach(({ c, p }, j) => childResults.set(c, { result: results[j], caseDir: p.caseDir }));
  }
});

afterAll(() => {
  if (savedDebug !== undefined) process.env.TIERCAKE_DEBUG = savedDebug;
  if (scratch) rmSync(scratch, { recursive: true, force: true });
});

describe('the corpus folder', () => {
  it('holds at least 45 bad scenarios, each listed here with what its message must name', () => {
    const files = readdirSync(corpusDir).filter((f) => f !== '_valid-small.json');
    expect(files.length).toBeGreaterThanOrEqual(45);
    expect([...files].sort()).toEqual(Object.keys(fileCases).sort());
  });
});

describe('controls: the checks below can fail', () => {
  it('the valid base scenario solves, prints a summary and creates its output folder', async () => {
    const caseDir = join(scratch, 'control-solve');
    mkdirSync(caseDir);
    const r = await runInProcess(['solve', validFile, '--out', join(caseDir, 'out'), '--quiet', '--threads', '1']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/corpus-case/);
    expect(existsSync(join(caseDir, 'out', 'summary.json'))).toBe(true);
  });

  it('a UTF-8 byte order mark is ignored (RFC 8259, section 8.1)', async () => {
    const r = await runInProcess(['check', generated['with-bom.json']]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/scenario corpus-case: valid/);
  });
});

describe('every bad input fails cleanly: exit 2, one short paragraph naming the field or file, nothing written', () => {
  cases.forEach((c, index) => {
    const test = c.pending ? it.fails : it;
    const title = c.pending ? `${c.title} (pending a fix outside the scenario loader: ${c.pending})` : c.title;
    test(`${title}${c.child ? ' [child process]' : ''}`, async () => {
      if (c.child) {
        const done = childResults.get(c);
        expect(done, 'child process did not run').toBeDefined();
        expectCleanFailure(done!.result, c, done!.caseDir);
        return;
      }
      const p = prepare(c, index);
      const r = await runInProcess(p.argv);
      expectCleanFailure(r, c, p.caseDir);
    });
  });
});

describe('the JSON scanner behind the line-and-column messages', () => {
  // Reference: V8's JSON.parse (ECMA-262 JSON.parse, the grammar of RFC 8259). The scanner
  // must call a text valid exactly when JSON.parse accepts it, for valid scenarios and for
  // thousands of one-character corruptions of them (deletions, insertions, replacements).
  it('agrees with JSON.parse on which texts are valid', () => {
    const seeds = readdirSync(corpusDir)
      .map((f) => join(corpusDir, f))
      .filter((f) => f.endsWith('.json'))
      .map((f) => readFileSyncUtf8(f))
      .filter((t) => t.length < 4000);
    const alphabet = ['{', '}', '[', ']', ',', ':', '"', "'", '/', '\\', '-', '+', '..', 'e', '0', '7', 'N', 'x', ' ', '\n', '\t', '\u0001'];
    const rand = garbageBytes(60_000, 99);
    let r = 0;
    let disagreements: string[] = [];
    let invalidSeen = 0;
    for (const seed of seeds) {
      for (let trial = 0; trial < 60; trial++) {
        const at = ((rand[r++] << 8) | rand[r++]) % (seed.length + 1);
        const op = rand[r++] % 3;
        const ch = alphabet[rand[r++] % alphabet.length];
        const text = op === 0 ? seed.slice(0, at) + seed.slice(at + 1) : op === 1 ? seed.slice(0, at) + ch + seed.slice(at) : seed.slice(0, at) + ch + seed.slice(at + 1);
        let parses = true;
        try {
          JSON.parse(text);
        } catch {
          parses = false;
          invalidSeen++;
        }
        const problem = locateJsonProblem(text);
        if ((problem === null) !== parses) disagreements.push(JSON.stringify(text.slice(Math.max(0, at - 20), at + 20)));
        if (problem) {
          expect(problem.offset).toBeGreaterThanOrEqual(0);
          expect(problem.offset).toBeLessThanOrEqual(text.length);
        }
      }
    }
    disagreements = disagreements.slice(0, 5);
    expect(disagreements).toEqual([]);
    expect(invalidSeen).toBeGreaterThan(1000);
  });
});
