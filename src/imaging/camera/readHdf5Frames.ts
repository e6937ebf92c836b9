// HDF5 datasets (The HDF Group, HDF5 file format specification 3.0) through h5wasm (the HDF5
// C library compiled to WebAssembly, NIST). The file's bytes are written into h5wasm's
// in-memory (Emscripten MEMFS) file system under a private name, read, closed and removed:
// no host file system is touched, so this reader takes bytes like the others.
//
// A dataset is addressed as `file.h5:/group/name` (see frameAddress.ts). A 2D dataset
// (rows, cols) is one frame; a 3D dataset (frames, rows, cols) is a stack; HDF5 stores C
// order, so dataset[row, col] is our (y = row, x = col), as h5py shows it. Without a dataset
// path, the file must hold exactly one 2D or 3D numeric dataset. The dataset's attributes are
// returned as metadata (numbers, strings, booleans and short arrays of them).
//
// h5wasm notes (version 0.10.3, HDF5 2.0.0): by default HDF5 prints its error stack to the
// console and returns an invalid id; we switch on h5wasm's throwing error handler once, and
// check the HDF5 signature ourselves first (HDF5 file format specification, section "Format
// Signature": 8 bytes \x89HDF\r\n\x1a\n at offset 0, 512, 1024, 2048, ...).

import h5wasm from 'h5wasm';
import { FrameReadError } from './frameReadError.js';
import type { FrameStack, MetadataValue } from './frameStack.js';

const signature = [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a];

/** True when the HDF5 format signature is at offset 0 or 512 * 2^k (section on the superblock). */
export function hasHdf5Signature(bytes: Uint8Array): boolean {
  for (let offset = 0; offset + 8 <= bytes.length; offset = offset === 0 ? 512 : offset * 2) {
    if (signature.every((b, i) => bytes[offset + i] === b)) return true;
  }
  return false;
}

type Hdf5Module = Awaited<typeof h5wasm.ready>;
let modulePromise: Promise<Hdf5Module> | undefined;
let fileCounter = 0;

function hdf5Module(): Promise<Hdf5Module> {
  modulePromise ??= h5wasm.ready.then((module) => {
    module.activate_throwing_error_handler();
    return module;
  });
  return modulePromise;
}

function typeName(metadata: { type: number; size: number; signed: boolean }): string | undefined {
  // H5T class codes: 0 = integer, 1 = float (HDF5 H5Tpublic.h).
  if (metadata.type === 0 && [1, 2, 4, 8].includes(metadata.size)) return `${metadata.signed ? 'int' : 'uint'}${metadata.size * 8}`;
  if (metadata.type === 1 && (metadata.size === 4 || metadata.size === 8)) return `float${metadata.size * 8}`;
  return undefined;
}

function metadataValue(value: unknown): MetadataValue | undefined {
  if (typeof value === 'string' || typeof value === 'boolean') return value;
  if (typeof value === 'number') return value;
  if (typeof value === 'bigint') return Number(value);
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    const arr = Array.from(value as unknown as ArrayLike<number | bigint>, (v) => Number(v));
    return arr.length === 1 ? arr[0] : arr.length <= 64 ? arr : undefined;
  }
  if (Array.isArray(value) && value.length <= 64) {
    const out: (string | number | boolean)[] = [];
    for (const v of value) {
      const m = metadataValue(v);
      if (m === undefined || Array.isArray(m)) return undefined;
      out.push(m as string | number | boolean);
    }
    return out;
  }
  return undefined;
}

/** Paths of every dataset in the file, for messages and for the one-dataset default. */
function datasetPaths(file: InstanceType<typeof h5wasm.File>): string[] {
  const out: string[] = [];
  for (const path of file.paths()) {
    const entity = file.get(path);
    if (entity instanceof h5wasm.Dataset) out.push(path.startsWith('/') ? path : `/${path}`);
  }
  return out;
}

/**
 * Read a 2D or 3D numeric dataset of an HDF5 file (its bytes). `datasetPath` is the path
 * inside the file ('/shot/atoms'); without it the file must hold a single image dataset.
 * Metadata: `dataset` (its path), `dtype` (h5wasm's), and the dataset's attributes.
 */
export async function readHdf5Frames(bytes: Uint8Array, fileName: string, datasetPath?: string): Promise<FrameStack> {
  const label = datasetPath === undefined ? fileName : `${fileName}:${datasetPath}`;
  if (!hasHdf5Signature(bytes)) throw new FrameReadError(label, 'unknown-format', 'is not an HDF5 file (no HDF5 signature at offset 0, 512, 1024, ...)');
  const { FS } = await hdf5Module();
  const memoryName = `/tiercake-read-${++fileCounter}.h5`;
  FS.writeFile(memoryName, bytes);
  let file: InstanceType<typeof h5wasm.File> | undefined;
  try {
    try {
      file = new h5wasm.File(memoryName, 'r');
    } catch {
      throw new FrameReadError(label, 'damaged', 'the HDF5 file cannot be opened: it is damaged or cut short (its superblock or root group is unreadable)');
    }
    let path = datasetPath;
    if (path === undefined) {
      const candidates = datasetPaths(file).filter((p) => {
        const d = file!.get(p);
        return d instanceof h5wasm.Dataset && (d.shape?.length === 2 || d.shape?.length === 3);
      });
      if (candidates.length !== 1) {
        throw new FrameReadError(
          label,
          'dataset-missing',
          candidates.length === 0
            ? 'holds no 2D or 3D dataset to read as frames'
            : `holds ${candidates.length} image datasets (${candidates.slice(0, 8).join(', ')}${candidates.length > 8 ? ', ...' : ''}); name one as ${fileName}:/path/to/dataset`,
        );
      }
      path = candidates[0];
    }
    let entity;
    try {
      entity = file.get(path);
    } catch {
      entity = null;
    }
    if (!(entity instanceof h5wasm.Dataset)) {
      const known = datasetPaths(file);
      throw new FrameReadError(
        label,
        'dataset-missing',
        `${entity === null || entity === undefined ? 'has no dataset' : 'has a group, not a dataset,'} at ${path}; datasets in the file: ${known.slice(0, 12).join(', ') || 'none'}`,
      );
    }
    const dataset = entity;
    const shape = dataset.shape ?? [];
    const meta = dataset.metadata;
    const sampleType = typeName(meta);
    if (sampleType === undefined) {
      throw new FrameReadError(label, 'unsupported', `dataset ${path} has a non-numeric or unusual element type (h5wasm dtype ${JSON.stringify(dataset.dtype)}); store the frames as integers or floats`);
    }
    if (shape.length !== 2 && shape.length !== 3) {
      throw new FrameReadError(label, 'not-an-image', `dataset ${path} has shape (${shape.join(', ')}); expected (rows, cols) or (frames, rows, cols)`);
    }
    const [frameCount, height, width] = shape.length === 2 ? [1, shape[0], shape[1]] : shape;
    if (frameCount < 1 || height < 1 || width < 1) throw new FrameReadError(label, 'not-an-image', `dataset ${path} is empty (shape (${shape.join(', ')}))`);
    let value: unknown;
    try {
      value = dataset.value;
    } catch {
      throw new FrameReadError(label, 'damaged', `the data of ${path} cannot be read (damaged or cut short, or compressed with a filter this reader lacks)`);
    }
    if (!ArrayBuffer.isView(value) || (value as unknown as ArrayLike<number>).length !== frameCount * height * width) {
      throw new FrameReadError(label, 'damaged', `the data of ${path} did not come back as ${frameCount * height * width} numbers`);
    }
    const flat = value as unknown as ArrayLike<number | bigint>;
    const perFrame = width * height;
    const frames: Float64Array[] = [];
    for (let f = 0; f < frameCount; f++) {
      const out = new Float64Array(perFrame);
      for (let i = 0; i < perFrame; i++) out[i] = Number(flat[f * perFrame + i]);
      frames.push(out);
    }
    const metadata: Record<string, MetadataValue> = { dataset: path, dtype: String(dataset.dtype) };
    for (const [key, attribute] of Object.entries(dataset.attrs)) {
      let v: MetadataValue | undefined;
      try {
        v = metadataValue(attribute.value);
      } catch {
        v = undefined;
      }
      if (v !== undefined) metadata[key] = v;
    }
    return { frames, width, height, sourceFormat: 'hdf5', sampleType, source: label, metadata };
  } finally {
    try {
      file?.close();
    } catch {
      // closing a file that failed half-way: nothing more to release
    }
    FS.unlink(memoryName);
  }
}
