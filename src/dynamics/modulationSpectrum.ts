// Modulation spectroscopy (Stoferle, Moritz, Schori, Kohl & Esslinger, PRL 92, 130403
// (2004)): modulate the lattice depth at frequency f for a fixed duration and record what
// the cloud absorbed. For every f the same initial state is evolved under the modulated
// Hamiltonian; at the end the energy is measured with the unmodulated Hamiltonian:
//
//   energyAbsorbed   <H0>(T) - <H0>(0)
//   doublonsCreated  sum_i P_i(2) at T minus at 0 (and the same for P(n >= 2))
//
// Caution (physics, not numerics): a Gutzwiller Mott shell (phi = 0) is an exact stationary
// state of these equations for any J(t), so in single-site mean field a pure Mott
// insulator absorbs nothing at U; the response comes from the superfluid parts of the cloud
// (their gapped amplitude mode and the particle-hole admixture of the superfluid state).
// The measured peak near U in experiments comes from particle-hole excitations that
// single-site mean field lacks in the insulator.

import { createDrive, type Drive } from './drive.js';
import { copyFrame, type DynamicsFrame } from './dynamicsFrame.js';
import { createObservableWorkspace, evolutionTotals, type EvolutionTotals } from './dynamicObservables.js';
import { evolve, type EvolveResult, type IntegratorOptions } from './evolve.js';
import { copyState, type GutzwillerState } from './gutzwillerState.js';
import { latticeModulation } from './latticeModulation.js';
import { depthTableCovering } from './depthTable.js';

export interface ModulationSpectrumRequest {
  initial: GutzwillerState;
  /** the unmodulated Hamiltonian (not changed) */
  frame: DynamicsFrame;
  /** the drive for one frequency; it drives a private copy of the frame */
  driveFor: (frequency: number, frame: DynamicsFrame) => Drive;
  /** cycles per time unit of the evolution (kHz when times are in ms) */
  frequencies: readonly number[];
  duration: number;
  integrator: IntegratorOptions;
  shellFilling?: Int32Array | null;
  observer?: (progress: { index: number; frequency: number; result: EvolveResult }) => void | 'stop';
}

export interface ModulationPoint {
  frequency: number;
  energyAbsorbed: number;
  energyAbsorbedPerAtom: number;
  doublonsCreated: number;
  multiplyOccupiedCreated: number;
  condensedAtomsChange: number;
  status: EvolveResult['status'];
  message: string;
}

export interface ModulationSpectrum {
  initial: EvolutionTotals;
  points: ModulationPoint[];
  stopped: boolean;
}

export async function modulationSpectrum(request: ModulationSpectrumRequest): Promise<ModulationSpectrum> {
  const ws = createObservableWorkspace(request.initial.siteCount);
  const shells = request.shellFilling ?? null;
  const before = evolutionTotals(request.initial, request.frame, ws, shells);
  const points: ModulationPoint[] = [];
  for (let index = 0; index < request.frequencies.length; index++) {
    const frequency = request.frequencies[index];
    const state = copyState(request.initial);
    const frame = copyFrame(request.frame);
    const result = await evolve({
      state,
      frame,
      drive: request.driveFor(frequency, frame),
      outputTimes: [request.duration],
      integrator: request.integrator,
    });
    const after = evolutionTotals(state, request.frame, ws, shells);
    points.push({
      frequency,
      energyAbsorbed: after.energy - before.energy,
      energyAbsorbedPerAtom: (after.energy - before.energy) / before.atoms,
      doublonsCreated: after.doublonsExactlyTwo - before.doublonsExactlyTwo,
      multiplyOccupiedCreated: after.multiplyOccupied - before.multiplyOccupied,
      condensedAtomsChange: after.condensedAtoms - before.condensedAtoms,
      status: result.status,
      message: result.message,
    });
    if (request.observer?.({ index, frequency, result }) === 'stop') return { initial: before, points, stopped: true };
  }
  return { initial: before, points, stopped: false };
}

export interface DepthModulationInput {
  /** V0, E_r: the depth of the static model */
  baseDepthEr: number;
  relativeAmplitude: number;
  /** physical axes whose depth is modulated; default all */
  axes?: readonly number[];
  startTime?: number;
  endTime?: number;
}

/** driveFor of a lattice-depth modulation V0 (1 + A sin 2 pi f t), J and U from the band structure. */
export function depthModulationDrives(input: DepthModulationInput): (frequency: number, frame: DynamicsFrame) => Drive {
  const { baseDepthEr, relativeAmplitude } = input;
  const table = depthTableCovering([baseDepthEr * (1 - relativeAmplitude), baseDepthEr * (1 + relativeAmplitude)]);
  return (frequency, frame) =>
    createDrive(frame, {
      latticeDepth: {
        depthEr: latticeModulation({ baseValue: baseDepthEr, relativeAmplitude, frequency, startTime: input.startTime, endTime: input.endTime }),
        baseDepthEr,
        table,
        axes: input.axes,
      },
    });
}

/** driveFor of a hopping modulation J(t) = J0 (1 + A sin 2 pi f t) (dimensionless mode, no band structure). */
export function hoppingModulationDrives(relativeAmplitude: number, startTime = 0, endTime?: number): (frequency: number, frame: DynamicsFrame) => Drive {
  return (frequency, frame) =>
    createDrive(frame, { hoppingFactor: latticeModulation({ baseValue: 1, relativeAmplitude, frequency, startTime, endTime }) });
}
