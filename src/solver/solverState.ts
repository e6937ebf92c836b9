// Solver state on SharedArrayBuffers, so that the same memory is read and written by the
// main thread and by worker threads without copies. `SolverLayout` is the plain,
// structured-cloneable description a worker needs to rebuild its array views.

import type { LatticeModel } from '../lattice/latticeModel.js';
import type { KernelFields, MeasureFields } from './sweepKernel.js';

export interface SolverLayout {
  inner: [number, number, number];
  innerPeriodic: [boolean, boolean, boolean];
  nmax: number;
  siteCount: number;
  interactionU: number;
  hopUniform: [number, number, number];
  buffers: {
    eps: SharedArrayBuffer;
    interaction: SharedArrayBuffer | null;
    hop: [SharedArrayBuffer | null, SharedArrayBuffer | null, SharedArrayBuffer | null];
    phi: SharedArrayBuffer;
    delta: SharedArrayBuffer;
    lowerEnergy: SharedArrayBuffer;
    psiPrev: SharedArrayBuffer;
    density: SharedArrayBuffer;
    densitySq: SharedArrayBuffer;
    parityOdd: SharedArrayBuffer;
    topWeight: SharedArrayBuffer;
    entropy: SharedArrayBuffer;
    psi: SharedArrayBuffer;
    grandPotential: SharedArrayBuffer;
    /** T > 0 only: per-site spectrum (nmax + 1 eigenvalues) and <j|b|j>, for warm starts */
    spectrum: SharedArrayBuffer | null;
    couplings: SharedArrayBuffer | null;
  };
}

export interface SolverState {
  layout: SolverLayout;
  fields: KernelFields;
  measure: MeasureFields;
}

function sharedCopy(values: Float64Array): SharedArrayBuffer {
  const buf = new SharedArrayBuffer(values.length * 8);
  new Float64Array(buf).set(values);
  return buf;
}

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
  const hop: [SharedArrayBuffer | null, SharedArrayBuffer | null, SharedArrayBuffer | null] = [null, null, null];
  const hopUniform: [number, number, number] = [0, 0, 0];
  for (let d = 0; d < g.dims; d++) {
    const h = model.hopping[d];
    if (typeof h === 'number') hopUniform[pad + d] = h;
    else hop[pad + d] = sharedCopy(h);
  }
  const lower = new Float64Array(n).fill(NaN);
  const layout: SolverLayout = {
    inner: [...g.inner] as [number, number, number],
    innerPeriodic: [...g.innerPeriodic] as [boolean, boolean, boolean],
    nmax: model.nmax,
    siteCount: n,
    interactionU: typeof model.interactionU === 'number' ? model.interactionU : NaN,
    hopUniform,
    buffers: {
      eps: sharedCopy(model.eps),
      interaction: typeof model.interactionU === 'number' ? null : sharedCopy(model.interactionU),
      hop,
      phi: sharedCopy(initialPhi),
      delta: new SharedArrayBuffer(n * 8),
      lowerEnergy: sharedCopy(lower),
      psiPrev: new SharedArrayBuffer(n * 8),
      density: new SharedArrayBuffer(n * 8),
      densitySq: new SharedArrayBuffer(n * 8),
      parityOdd: new SharedArrayBuffer(n * 8),
      topWeight: new SharedArrayBuffer(n * 8),
      entropy: new SharedArrayBuffer(n * 8),
      psi: new SharedArrayBuffer(n * 8),
      grandPotential: new SharedArrayBuffer(n * 8),
      spectrum: options.thermal ? sharedCopy(new Float64Array(n * (model.nmax + 1)).fill(NaN)) : null,
      couplings: options.thermal ? new SharedArrayBuffer(n * (model.nmax + 1) * 8) : null,
    },
  };
  return viewsOf(layout);
}

/** Array views on a layout's buffers (used by the main thread and by each worker). */
export function viewsOf(layout: SolverLayout): SolverState {
  const b = layout.buffers;
  const f64 = (x: SharedArrayBuffer): Float64Array => new Float64Array(x);
  const fields: KernelFields = {
    inner: layout.inner,
    innerPeriodic: layout.innerPeriodic,
    nmax: layout.nmax,
    eps: f64(b.eps),
    interactionArray: b.interaction ? f64(b.interaction) : null,
    interactionU: layout.interactionU,
    hopArrays: [b.hop[0] ? f64(b.hop[0]) : null, b.hop[1] ? f64(b.hop[1]) : null, b.hop[2] ? f64(b.hop[2]) : null],
    hopUniform: layout.hopUniform,
    phi: f64(b.phi),
    delta: f64(b.delta),
    lowerEnergy: f64(b.lowerEnergy),
    psiPrev: f64(b.psiPrev),
    spectrum: b.spectrum ? f64(b.spectrum) : null,
    couplings: b.couplings ? f64(b.couplings) : null,
  };
  const measure: MeasureFields = {
    density: f64(b.density),
    densitySq: f64(b.densitySq),
    parityOdd: f64(b.parityOdd),
    topWeight: f64(b.topWeight),
    entropy: f64(b.entropy),
    psi: f64(b.psi),
    grandPotential: f64(b.grandPotential),
  };
  return { layout, fields, measure };
}
