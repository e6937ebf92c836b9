// The two implementations of the red-black half-sweep and the measuring pass behind one
// interface: the JavaScript reference (../sweepKernel.ts, the test oracle) and the
// WebAssembly kernel (assembly/*.ts, f64x2 pairs of same-colour sites at T = 0), which
// performs the same operations in the same order and so writes the same doubles. Each
// thread creates its own kernel object on the shared state; `slot` selects its scratch.

import { createSiteWorkspace } from '../site/siteWorkspace.js';
import type { SolverLayout, SolverState } from '../solverState.js';
import { SCRATCH_SLOT_BYTES } from '../solverState.js';
import { measureRows, sweepColour } from '../sweepKernel.js';
import { kernelModule } from './kernelModule.js';

/** 'auto': the WebAssembly kernel where it can run, else the JavaScript reference. */
export type KernelChoice = 'auto' | 'wasm' | 'js';
export type KernelName = 'wasm' | 'js';

export interface SweepKernel {
  readonly name: KernelName;
  /** update one colour in rows [rowStart, rowEnd); returns max |delta phi| */
  sweep(colour: number, rowStart: number, rowEnd: number, mu: number, temperature: number): number;
  /** measured fields of rows [rowStart, rowEnd) */
  measure(rowStart: number, rowEnd: number, mu: number, temperature: number): void;
}

let defaultChoice: KernelChoice = 'auto';

/**
 * The kernel choice of executors created without one (process-wide; the command line sets
 * it from the TIERCAKE_KERNEL environment variable, the test setup likewise).
 */
export function setDefaultKernelChoice(choice: KernelChoice): void {
  defaultChoice = choice;
}
export function defaultKernelChoice(): KernelChoice {
  return defaultChoice;
}

/** Parse a kernel choice ('auto' | 'wasm' | 'js'); `source` names the setting in the error. */
export function parseKernelChoice(value: string, source: string): KernelChoice {
  if (value === 'auto' || value === 'wasm' || value === 'js') return value;
  throw new RangeError(`${source}: expected "auto", "wasm" or "js", got "${value}"`);
}

/** Largest Fock space of the WebAssembly kernel (its scratch; the reference goes further). */
export const WASM_MAX_STATES = 17;

/** '' when the WebAssembly kernel can run on this layout, otherwise the reason it cannot. */
export function wasmUnsupportedReason(layout: SolverLayout): string {
  if (kernelModule.module === null) return kernelModule.reason;
  if (layout.memory === null) return 'the solver state is too large for one WebAssembly memory (4 GiB)';
  if (layout.nmax + 1 > WASM_MAX_STATES) return `nmax = ${layout.nmax} is above the WebAssembly kernel's limit ${WASM_MAX_STATES - 1}`;
  return '';
}

/** The kernel a choice resolves to on this layout; 'wasm' that cannot run throws. */
export function resolveKernel(choice: KernelChoice, layout: SolverLayout): KernelName {
  if (choice === 'js') return 'js';
  const reason = wasmUnsupportedReason(layout);
  if (choice === 'wasm' && reason !== '') throw new RangeError(`solver.kernel: "wasm" cannot run here: ${reason}; use "auto" or "js"`);
  return reason === '' ? 'wasm' : 'js';
}

export function createJsKernel(state: SolverState): SweepKernel {
  const ws = createSiteWorkspace(state.layout.nmax);
  return {
    name: 'js',
    sweep: (colour, rowStart, rowEnd, mu, temperature) => sweepColour(state.fields, ws, colour, rowStart, rowEnd, mu, temperature),
    measure: (rowStart, rowEnd, mu, temperature) => measureRows(state.fields, state.measure, ws, rowStart, rowEnd, mu, temperature),
  };
}

interface KernelExports {
  setGeometry(n0: number, n1: number, n2: number, p0: number, p1: number, p2: number, nmax: number, u: number, j0: number, j1: number, j2: number): void;
  setFields(eps: number, interaction: number, hop0: number, hop1: number, hop2: number, phi: number, delta: number, lower: number, psiPrev: number, spectrum: number, couplings: number): void;
  setMeasureFields(density: number, densitySq: number, parityOdd: number, topWeight: number, entropy: number, psi: number, grandPotential: number): void;
  setScratch(slot: number): void;
  setScalarOnly(flag: number): void;
  setQuads(flag: number): void;
  sweepColour(colour: number, rowStart: number, rowEnd: number, mu: number, temperature: number): number;
  measureRows(rowStart: number, rowEnd: number, mu: number, temperature: number): void;
  SLOT_BYTES: WebAssembly.Global;
}

/** The kernel's exports bound to a state (for the kernel tests: fdExp/fdLog too). */
export function instantiateWasmKernel(layout: SolverLayout, slot: number): WebAssembly.Exports {
  const reason = wasmUnsupportedReason(layout);
  if (reason !== '') throw new RangeError(`WebAssembly kernel: ${reason}`);
  if (!Number.isInteger(slot) || slot < 0 || slot >= layout.scratchSlots) {
    throw new RangeError(`kernel slot: expected an integer in [0, ${layout.scratchSlots - 1}], got ${slot}`);
  }
  const instance = new WebAssembly.Instance(kernelModule.module as WebAssembly.Module, { env: { memory: layout.memory as WebAssembly.Memory } });
  const k = instance.exports as unknown as KernelExports;
  if (k.SLOT_BYTES.value !== SCRATCH_SLOT_BYTES) throw new Error(`WebAssembly kernel scratch is ${k.SLOT_BYTES.value} bytes, expected ${SCRATCH_SLOT_BYTES}: rebuild it`);
  const a = layout.arrays;
  const at = (s: { offset: number } | null): number => (s === null ? 0 : s.offset);
  k.setGeometry(
    layout.inner[0], layout.inner[1], layout.inner[2],
    layout.innerPeriodic[0] ? 1 : 0, layout.innerPeriodic[1] ? 1 : 0, layout.innerPeriodic[2] ? 1 : 0,
    layout.nmax, layout.interactionU, layout.hopUniform[0], layout.hopUniform[1], layout.hopUniform[2],
  );
  k.setFields(at(a.eps), at(a.interaction), at(a.hop[0]), at(a.hop[1]), at(a.hop[2]), at(a.phi), at(a.delta), at(a.lowerEnergy), at(a.psiPrev), at(a.spectrum), at(a.couplings));
  k.setMeasureFields(at(a.density), at(a.densitySq), at(a.parityOdd), at(a.topWeight), at(a.entropy), at(a.psi), at(a.grandPotential));
  k.setScratch(layout.scratchOffset + slot * SCRATCH_SLOT_BYTES);
  return instance.exports;
}

/**
 * WebAssembly kernel on `state` using scratch slot `slot`. Sweeps take four sites at a time
 * (two interleaved f64x2 pairs); quads = false: pairs only; pairs = false: one site at a
 * time. All give the same doubles.
 */
export function createWasmKernel(state: SolverState, slot: number, options: { pairs?: boolean; quads?: boolean } = {}): SweepKernel {
  const k = instantiateWasmKernel(state.layout, slot) as unknown as KernelExports;
  k.setScalarOnly(options.pairs === false ? 1 : 0);
  k.setQuads(options.quads === false ? 0 : 1);
  return {
    name: 'wasm',
    sweep: (colour, rowStart, rowEnd, mu, temperature) => k.sweepColour(colour, rowStart, rowEnd, mu, temperature),
    measure: (rowStart, rowEnd, mu, temperature) => k.measureRows(rowStart, rowEnd, mu, temperature),
  };
}

export function createSweepKernel(state: SolverState, name: KernelName, slot: number): SweepKernel {
  return name === 'wasm' ? createWasmKernel(state, slot) : createJsKernel(state);
}
