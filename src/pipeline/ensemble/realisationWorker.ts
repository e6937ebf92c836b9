// Worker-thread entry point (piscina) for ensembles of small lattices: solves one whole
// realisation serially (solveRealisation.ts) and hands back its per-site arrays by
// transferring their buffers instead of copying them. Realisations then run side by
// side, one per thread; accumulation stays on the main thread in realisation order.

import { Piscina } from 'piscina';
import { solveRealisation, type RealisationResult } from './solveRealisation.js';

export interface RealisationTask {
  /** scenario JSON with overrides applied (its disorder.seed is replaced) */
  scenario: Record<string, unknown>;
  /** the scenario's own disorder seed; realisation r uses `${baseSeed}/${r}` */
  baseSeed: string;
  index: number;
  /** folder of the scenario file (landscape files are relative to it) */
  scenarioDirectory?: string;
}

export default async function runRealisationTask(task: RealisationTask): Promise<RealisationResult> {
  const result = await solveRealisation(task.scenario, task.baseSeed, task.index, undefined, undefined, task.scenarioDirectory);
  const movable = {
    [Piscina.transferableSymbol]: [result.density.buffer, result.condensateDensity.buffer, result.phaseCodes.buffer],
    [Piscina.valueSymbol]: result,
  };
  // piscina unwraps the value and transfers the listed buffers (piscina README, "Piscina.move").
  return Piscina.move(movable as unknown as ArrayBuffer) as unknown as RealisationResult;
}
