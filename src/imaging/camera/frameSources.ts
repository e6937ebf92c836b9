// Reading the camera frames `compare` is pointed at: files, HDF5 datasets, lists and
// folders, each decoded by the camera core's readers (readFrames.ts: TIFF, HDF5, FITS, .npy,
// PNG, told apart by their first bytes) in the camera convention a[row, col], row 0 at the
// top. This file and pictureSidecar.ts are the only ones of the camera core that touch the
// file system; the decoders stay bytes in, frames out. Every problem is an InputError naming
// the option it is given (the caller passes the option's name).
//
// A source is written as
//   frames.tif            a file: every frame (page, plane) of it, in file order;
//   run7.h5:/shot/atoms   one HDF5 dataset (2D: one frame, 3D: a stack);
//   shots/                a folder: every readable frame file in it, in natural name order
//                         (shot2 before shot10); other files (sidecars, notes) are skipped.
// Inside one shot file (`--shots`), a frame is addressed by an HDF5 dataset path ('/atoms')
// or by its index in the file (0, 1, 2 for the pages of a TIFF or the planes of a 3D array).

import { closeSync, openSync, readdirSync, readFileSync, readSync, statSync } from 'node:fs';
import { basename, join } from 'node:path';
import { detectFrameFormat, readFrames } from './readFrames.js';
import { FrameReadError } from './frameReadError.js';
import { parseFrameAddress } from './frameAddress.js';
import type { FrameStack } from './frameStack.js';
import type { PixelImage } from './pixelImage.js';
import { InputError } from '../../scenario/inputError.js';

/** Largest file read (a 16k x 16k float64 frame is 2 GiB; camera frames and stacks are far smaller). */
const MAX_FILE_BYTES = 1 << 30;

export interface FrameSet {
  frames: PixelImage[];
  /** One label per frame: file (dataset) and frame number when the file holds several. */
  labels: string[];
  /** Every file and folder read (inputs of the run). */
  inputs: string[];
  /** Format and sample type of the first file, e.g. 'tiff uint16'. */
  format: string;
}

function readBytes(path: string, option: string): Uint8Array {
  let size: number;
  try {
    const st = statSync(path);
    if (!st.isFile()) throw new InputError(`${option}: ${path} is not a regular file; give a frame file, an HDF5 dataset (file.h5:/path) or a folder of frames`);
    size = st.size;
  } catch (err) {
    if (err instanceof InputError) throw err;
    throw new InputError(`${option}: ${path} was not found or cannot be read; check the path`);
  }
  if (size > MAX_FILE_BYTES) throw new InputError(`${option}: ${path} is ${size} bytes, more than a stack of camera frames can be (limit ${MAX_FILE_BYTES}); is this the right file?`);
  try {
    return readFileSync(path);
  } catch {
    throw new InputError(`${option}: ${path} cannot be read; check its permissions`);
  }
}

async function decode(bytes: Uint8Array, name: string, option: string, dataset?: string): Promise<FrameStack> {
  try {
    return await readFrames(bytes, name, dataset !== undefined ? { dataset } : {});
  } catch (err) {
    if (err instanceof FrameReadError) throw new InputError(`${option}: ${err.message}`);
    throw err;
  }
}

function framesOf(stack: FrameStack): PixelImage[] {
  return stack.frames.map((values) => ({ width: stack.width, height: stack.height, values }));
}

function labelsOf(stack: FrameStack): string[] {
  return stack.frames.length === 1 ? [stack.source] : stack.frames.map((_, k) => `${stack.source} [frame ${k}]`);
}

const natural = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

function isFolder(path: string): boolean {
  try {
    return statSync(path).isDirectory();
  } catch {
    return false;
  }
}

/** The readable frame files of a folder, in natural name order (see the file header). */
export function frameFilesIn(folder: string, option: string): string[] {
  let names: string[];
  try {
    names = readdirSync(folder);
  } catch {
    throw new InputError(`${option}: the folder ${folder} cannot be read; check the path and its permissions`);
  }
  const files: string[] = [];
  for (const name of names.filter((n) => !n.startsWith('.')).sort(natural.compare)) {
    const path = join(folder, name);
    let st;
    try {
      st = statSync(path);
    } catch {
      continue;
    }
    if (!st.isFile() || st.size === 0 || st.size > MAX_FILE_BYTES) continue;
    // The first bytes tell the format (an HDF5 signature may sit at offset 512 or 1024).
    const head = new Uint8Array(Math.min(st.size, 1032));
    try {
      const fd = openSync(path, 'r');
      try {
        readSync(fd, head, 0, head.length, 0);
      } finally {
        closeSync(fd);
      }
    } catch {
      continue;
    }
    if (detectFrameFormat(head) !== undefined) files.push(path);
  }
  if (files.length === 0) throw new InputError(`${option}: the folder ${folder} holds no TIFF, HDF5, FITS, .npy or PNG frame file`);
  return files;
}

/** Every frame of one source: a file, an HDF5 dataset or a folder. */
export async function readFrameSource(text: string, option: string): Promise<FrameSet> {
  const source = text.trim();
  if (source.length === 0) throw new InputError(`${option}: a source is empty; give a frame file, an HDF5 dataset (file.h5:/path) or a folder`);
  if (isFolder(source)) {
    const files = frameFilesIn(source, option);
    const set: FrameSet = { frames: [], labels: [], inputs: [source], format: '' };
    for (const file of files) {
      const stack = await decode(readBytes(file, option), file, option);
      if (set.format === '') set.format = `${stack.sourceFormat} ${stack.sampleType}`;
      set.frames.push(...framesOf(stack));
      set.labels.push(...labelsOf(stack));
    }
    return set;
  }
  const address = parseFrameAddress(source);
  const stack = await decode(readBytes(address.file, option), source, option);
  return { frames: framesOf(stack), labels: labelsOf(stack), inputs: [address.file], format: `${stack.sourceFormat} ${stack.sampleType}` };
}

/** Several sources separated by commas, read in order and joined. */
export async function readFrameSources(text: string, option: string): Promise<FrameSet> {
  const set: FrameSet = { frames: [], labels: [], inputs: [], format: '' };
  for (const part of text.split(',')) {
    const one = await readFrameSource(part, option);
    if (set.format === '') set.format = one.format;
    set.frames.push(...one.frames);
    set.labels.push(...one.labels);
    set.inputs.push(...one.inputs);
  }
  return set;
}

/** The shot files of `--shots`: a folder (its frame files) or a comma-separated list of files. */
export function shotFiles(text: string, option: string): string[] {
  const parts = text.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
  if (parts.length === 0) throw new InputError(`${option}: give a folder of shot files or a comma-separated list of them`);
  const files: string[] = [];
  for (const part of parts) {
    if (isFolder(part)) files.push(...frameFilesIn(part, option));
    else files.push(part);
  }
  return files;
}

/** Is `role` an address inside a shot file: an HDF5 dataset path or a frame index? */
export function parseInShotAddress(role: string, option: string): { dataset: string } | { frame: number } {
  const r = role.trim();
  if (r.startsWith('/')) return { dataset: r };
  if (/^\d+$/.test(r)) return { frame: Number(r) };
  throw new InputError(`${option}: with --shots, name each frame inside a shot file by its HDF5 dataset path (/atoms) or its index in the file (0, 1, 2), got "${role}"`);
}

/** The frames of one shot file, one per role, read once (HDF5: one dataset per role). */
export async function readShotFrames(file: string, roles: readonly string[], option: string): Promise<PixelImage[]> {
  const bytes = readBytes(file, option);
  const out: PixelImage[] = [];
  let whole: FrameStack | undefined;
  for (const role of roles) {
    const address = parseInShotAddress(role, option);
    if ('dataset' in address) {
      const stack = await decode(bytes, `${file}:${address.dataset}`, option, address.dataset);
      if (stack.frames.length !== 1) throw new InputError(`${option}: ${file}:${address.dataset} holds ${stack.frames.length} frames; a role inside a shot file must be one frame`);
      out.push(framesOf(stack)[0]);
    } else {
      whole ??= await decode(bytes, file, option);
      if (address.frame >= whole.frames.length) {
        throw new InputError(`${option}: ${basename(file)} holds ${whole.frames.length} frame(s), numbered from 0; there is no frame ${address.frame}`);
      }
      out.push(framesOf(whole)[address.frame]);
    }
  }
  return out;
}
