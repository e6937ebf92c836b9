// Solver state in shared memory, so that the same arrays are read and written by the main
// thread and by worker threads without copies, and by the WebAssembly kernel without
// copies: when that kernel is built, every array lives in one shared WebAssembly.Memory
// (its buffer is a SharedArrayBuffer), otherwise in a plain SharedArrayBuffer.
// `SolverLayout` is the plain, structured-cloneable description a worker needs to rebuild
// its array views.

import type { LatticeModel } from '../lattice/latticeModel.js';
import { kernelModule } from './kernel/kernelModule.js';
import type { KernelFields, MeasureFields } from './sweepKernel.js';

/** A Float64Array inside the layout's buffer. */
export interface ArraySlot {
  /** byte offset */
  offset: number;
  length: number;
}

export interface SolverLayout {
  inner: [number, number, number];
  innerPeriodic: [boolean, boolean, boolean];
  nmax: number;
  siteCount: number;
  interactionU: number;
  hopUniform: [number, number, number];
  /** shared WebAssembly memory that holds every array, or null (plain SharedArrayBuffer) */
  memory: WebAssembly.Memory | null;
  /** memory.buffer, or the plain buffer */
  buffer: SharedArrayBuffer;
  /** per-thread scratch of the WebAssembly kernel: slot k at scratchOffset + k * SCRATCH_SLOT_BYTES */
  scratchOffset: number;
  scratchSlots: number;
  arrays: {
    eps: ArraySlot;
    interaction: ArraySlot | null;
    hop: [ArraySlot | null, ArraySlot | null, ArraySlot | null];
    phi: ArraySlot;
    delta: ArraySlot;
    lowerEnergy: ArraySlot;
    psiPrev: ArraySlot;
    density: ArraySlot;
    densitySq: ArraySlot;
    parityOdd: ArraySlot;
    topWeight: ArraySlot;
    entropy: ArraySlot;
    psi: ArraySlot;
    grandPotential: ArraySlot;
    /** T > 0 only: per-site spectrum (nmax + 1 eigenvalues) and <j|b|j>, for warm starts */
    spectrum: ArraySlot | null;
    couplings: ArraySlot | null;
  };
}

export interface SolverState {
  layout: SolverLayout;
  fields: KernelFields;
  measure: MeasureFields;
}

/** Bytes of one thread's scratch in the WebAssembly kernel (assembly/scratch.ts SLOT_BYTES). */
export const SCRATCH_SLOT_BYTES = 16384;
/** Threads that can share one state with the WebAssembly kernel. */
export const MAX_KERNEL_THREADS = 64;
const PAGE = 65536;
/** Largest WebAssembly memory (pages of 64 KiB) JavaScript can create. */
const MAX_PAGES = 65536;

/** Bytes of solver state per site (for memory estimates before allocation). */
export function solverBytesPerSite(model: Pick<LatticeModel, 'interactionU' | 'hopping'>): number {
  let arrays = 12; // eps, phi, delta, lowerEnergy, psiPrev, 7 measured fields
  if (typeof model.interactionU !== 'number') arrays++;
  for (const h of model.hopping) if (typeof h !== 'number') arrays++;
  return arrays * 8;
}

/**
 * Allocate the shared state for a model; phi starts at `initialPhi` (never all zero).
 * `thermal` adds the per-site spectrum store used by the T > 0 sweeps.
 */
export function createSolverState(model: LatticeModel, initialPhi: Float64Array, options: { thermal?: boolean } = {}): SolverState {
  const g = model.geometry;
  const n = g.siteCount;
  const pad = 3 - g.dims;
  const states = model.nmax + 1;
  // Byte offsets: a reserved first page (the kernel's own statics), the scratch slots,
  // then the arrays, each 16-byte aligned.
  const scratchOffset = PAGE;
  let cursor = scratchOffset + MAX_KERNEL_THREADS * SCRATCH_SLOT_BYTES;
  const slot = (length: number): ArraySlot => {
    const s = { offset: cursor, length };
    cursor += Math.ceil((length * 8) / 16) * 16;
    return s;
  };
  const hopUniform: [number, number, number] = [0, 0, 0];
  const hop: [ArraySlot | null, ArraySlot | null, ArraySlot | null] = [null, null, null];
  for (let d = 0; d < g.dims; d++) {
    const h = model.hopping[d];
    if (typeof h === 'number') hopUniform[pad + d] = h;
    else hop[pad + d] = slot(n);
  }
  const arrays: SolverLayout['arrays'] = {
    eps: slot(n),
    interaction: typeof model.interactionU === 'number' ? null : slot(n),
    hop,
    phi: slot(n),
    delta: slot(n),
    lowerEnergy: slot(n),
    psiPrev: slot(n),
    density: slot(n),
    densitySq: slot(n),
    parityOdd: slot(n),
    topWeight: slot(n),
    entropy: slot(n),
    psi: slot(n),
    grandPotential: slot(n),
    spectrum: options.thermal ? slot(n * states) : null,
    couplings: options.thermal ? slot(n * states) : null,
  };
  const pages = Math.ceil(cursor / PAGE);
  let memory: WebAssembly.Memory | null = null;
  let buffer: SharedArrayBuffer;
  if (kernelModule.module !== null && pages <= MAX_PAGES) {
    memory = new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
    buffer = memory.buffer as unknown as SharedArrayBuffer;
  } else {
    buffer = new SharedArrayBuffer(pages * PAGE);
  }
  const layout: SolverLayout = {
    inner: [...g.inner] as [number, number, number],
    innerPeriodic: [...g.innerPeriodic] as [boolean, boolean, boolean],
    nmax: model.nmax,
    siteCount: n,
    interactionU: typeof model.interactionU === 'number' ? model.interactionU : NaN,
    hopUniform,
    memory,
    buffer,
    scratchOffset,
    scratchSlots: MAX_KERNEL_THREADS,
    arrays,
  };
  const state = viewsOf(layout);
  state.fields.eps.set(model.eps);
  if (state.fields.interactionArray !== null) state.fields.interactionArray.set(model.interactionU as Float64Array);
  for (let d = 0; d < g.dims; d++) {
    const view = state.fields.hopArrays[pad + d];
    if (view !== null) view.set(model.hopping[d] as Float64Array);
  }
  state.fields.phi.set(initialPhi);
  state.fields.lowerEnergy.fill(NaN);
  state.fields.spectrum?.fill(NaN);
  return state;
}

/** Array views on a layout's buffer (used by the main thread and by each worker). */
export function viewsOf(layout: SolverLayout): SolverState {
  const a = layout.arrays;
  const buffer = layout.memory !== null ? (layout.memory.buffer as unknown as SharedArrayBuffer) : layout.buffer;
  const f64 = (s: ArraySlot): Float64Array => new Float64Array(buffer, s.offset, s.length);
  const maybe = (s: ArraySlot | null): Float64Array | null => (s === null ? null : f64(s));
  const fields: KernelFields = {
    inner: layout.inner,
    innerPeriodic: layout.innerPeriodic,
    nmax: layout.nmax,
    eps: f64(a.eps),
    interactionArray: maybe(a.interaction),
    interactionU: layout.interactionU,
    hopArrays: [maybe(a.hop[0]), maybe(a.hop[1]), maybe(a.hop[2])],
    hopUniform: layout.hopUniform,
    phi: f64(a.phi),
    delta: f64(a.delta),
    lowerEnergy: f64(a.lowerEnergy),
    psiPrev: f64(a.psiPrev),
    spectrum: maybe(a.spectrum),
    couplings: maybe(a.couplings),
  };
  const measure: MeasureFields = {
    density: f64(a.density),
    densitySq: f64(a.densitySq),
    parityOdd: f64(a.parityOdd),
    topWeight: f64(a.topWeight),
    entropy: f64(a.entropy),
    psi: f64(a.psi),
    grandPotential: f64(a.grandPotential),
  };
  return { layout, fields, measure };
}
