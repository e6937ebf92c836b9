// The default WebAssembly kernel (four sites at a time, assembly/groundQuad.ts) with the
// path counters of its instance readable (each WebAssembly instance has its own globals, so
// the counters must come from the instance that ran).
import { instantiateWasmKernel, type SweepKernel } from '../../src/solver/kernel/sweepKernels.js';
import type { SolverState } from '../../src/solver/solverState.js';

export interface QuadPathCounts {
  /** quads solved in the interleaved kernel */
  solved: number;
  /** quads whose leading determinants were recomputed per pair (no Taylor carry) */
  splitTrailing: number;
  /** quads whose four lanes did not share one twist index */
  splitAdjugate: number;
  /** lanes redone by the scalar code from their Weyl bound */
  laneFallbacks: number;
}

export function countingWasmKernel(state: SolverState, slot: number): SweepKernel & { counts(): QuadPathCounts } {
  const k = instantiateWasmKernel(state.layout, slot) as unknown as Record<string, WebAssembly.Global> & {
    sweepColour(colour: number, rowStart: number, rowEnd: number, mu: number, temperature: number): number;
    measureRows(rowStart: number, rowEnd: number, mu: number, temperature: number): void;
  };
  return {
    name: 'wasm',
    sweep: (colour, rowStart, rowEnd, mu, temperature) => k.sweepColour(colour, rowStart, rowEnd, mu, temperature),
    measure: (rowStart, rowEnd, mu, temperature) => k.measureRows(rowStart, rowEnd, mu, temperature),
    counts: () => ({
      solved: k.quadSolved.value as number,
      splitTrailing: k.quadSplitTrailing.value as number,
      splitAdjugate: k.quadSplitAdjugate.value as number,
      laneFallbacks: k.quadLaneFallbacks.value as number,
    }),
  };
}
