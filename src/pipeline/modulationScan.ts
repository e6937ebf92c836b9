// Modulation spectrum of the cloud at the end of an evolution (the loaded cloud), after
// Stoferle, Moritz, Schori, Kohl & Esslinger, PRL 92, 130403 (2004): for every frequency f
// the same state is evolved for a time D under the Hamiltonian of the end of the evolution
// with one key modulated, value (1 + A sin(2 pi f tau)), and measured with the unmodulated
// Hamiltonian:
//
//   energy absorbed    <H>(D) - <H>(0)         (conserved without modulation)
//   doublons created   sum_i P_i(2) at D minus the same after an unmodulated reference
//                      evolution over D (a loaded state that is not stationary changes its
//                      doublons by itself; the reference takes that out)
//
// Mean-field caveat (physics, not numerics): a Gutzwiller Mott site with phi = 0 is an exact
// stationary state for any J(t), so a Mott shell absorbs nothing at U in single-site mean
// field; the absorption comes from the superfluid parts of the cloud. The peak near U in
// experiments comes from particle-hole excitations of the insulator that this ansatz lacks.

import { createObservableWorkspace, evolutionTotals, type EvolutionTotals } from '../dynamics/dynamicObservables.js';
import type { DynamicsFrame } from '../dynamics/dynamicsFrame.js';
import type { DynamicsRunner } from '../dynamics/dynamicsRunner.js';
import { evolve, type EvolveResult, type IntegratorOptions } from '../dynamics/evolve.js';
import type { ModulationPoint } from '../dynamics/modulationSpectrum.js';
import { copyState, type GutzwillerState } from '../dynamics/gutzwillerState.js';
import type { LatticeGeometry } from '../lattice/latticeGeometry.js';
import type { EvolutionPlan } from './evolutionPlan.js';
import { scenarioDrive } from './scenarioDrive.js';

/** A point of the spectrum as the evolve command reports it (energies in the internal unit). */
export interface SpectrumPoint extends Omit<ModulationPoint, 'frequency'> {
  /** h f in the energy unit (ModulationPoint.frequency is cycles per time unit) */
  frequency: number;
  cyclesPerTimeUnit: number;
  steps: number;
  rejectedSteps: number;
}

export interface SpectrumResult {
  path: string;
  relativeAmplitude: number;
  duration: number;
  source: string;
  start: EvolutionTotals;
  /** the unmodulated evolution over the same time */
  reference: { energyChange: number; doublonsChange: number; status: EvolveResult['status'] };
  points: SpectrumPoint[];
  stopped: boolean;
}

export interface ScanRequest {
  plan: EvolutionPlan;
  /** the state at the end of the evolution (not changed) */
  start: GutzwillerState;
  /** the runner's frame, holding the Hamiltonian at `atTime` */
  frame: DynamicsFrame;
  runner: DynamicsRunner;
  geometry: LatticeGeometry;
  atTime: number;
  duration: number;
  integrator: IntegratorOptions;
  shellFilling: Int32Array | null;
  onPoint?: (index: number, count: number) => void;
}

export async function runModulationScan(request: ScanRequest): Promise<SpectrumResult> {
  const { plan, frame, runner, geometry } = request;
  const spectrum = plan.spectrum;
  if (!spectrum) throw new RangeError('runModulationScan: the plan has no spectrum');
  const epsAtEnd = Float64Array.from(frame.eps);
  const ws = createObservableWorkspace(request.start.siteCount);
  const run = async (cycles: number, amplitude?: number): Promise<{ totals: EvolutionTotals; result: EvolveResult }> => {
    frame.eps.set(epsAtEnd);
    const drive = scenarioDrive(frame, geometry, plan.spectrumTargets(cycles, request.duration, request.atTime, amplitude));
    const state = copyState(request.start);
    const result = await evolve({ state, frame, drive, runner, outputTimes: [request.duration], integrator: request.integrator });
    // the last output applied the drive at tau = D: the modulation is off, the Hamiltonian is that of atTime
    return { totals: evolutionTotals(state, frame, ws, request.shellFilling), result };
  };
  // the unmodulated Hamiltonian for the starting values
  frame.eps.set(epsAtEnd);
  scenarioDrive(frame, geometry, plan.spectrumTargets(1, request.duration, request.atTime, 0)).apply(0, frame, false);
  const start = evolutionTotals(request.start, frame, ws, request.shellFilling);
  const reference = await run(1, 0);
  const points: SpectrumPoint[] = [];
  const count = spectrum.frequencies.length;
  for (let k = 0; k < count; k++) {
    const { totals, result } = await run(spectrum.cyclesPerTimeUnit[k]);
    points.push({
      frequency: spectrum.frequencies[k],
      cyclesPerTimeUnit: spectrum.cyclesPerTimeUnit[k],
      energyAbsorbed: totals.energy - start.energy,
      energyAbsorbedPerAtom: (totals.energy - start.energy) / start.atoms,
      doublonsCreated: totals.doublonsExactlyTwo - reference.totals.doublonsExactlyTwo,
      multiplyOccupiedCreated: totals.multiplyOccupied - reference.totals.multiplyOccupied,
      condensedAtomsChange: totals.condensedAtoms - start.condensedAtoms,
      status: result.status,
      message: result.message,
      steps: result.statistics.steps,
      rejectedSteps: result.statistics.rejectedSteps,
    });
    request.onPoint?.(k + 1, count);
  }
  frame.eps.set(epsAtEnd);
  return {
    path: spectrum.path,
    relativeAmplitude: spectrum.relativeAmplitude,
    duration: request.duration,
    source: spectrum.source,
    start,
    reference: {
      energyChange: reference.totals.energy - start.energy,
      doublonsChange: reference.totals.doublonsExactlyTwo - start.doublonsExactlyTwo,
      status: reference.result.status,
    },
    points,
    stopped: false,
  };
}
