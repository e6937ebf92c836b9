// What `tiercake evolve` records at every output time of the evolution: one row of
// evolution.csv, and at chosen times the per-site snapshot (fields and pictures) and an
// animation frame. Observables (src/dynamics/dynamicObservables.ts), with P_i(n) = |c_{i,n}|^2:
//
//   energy            mean-field <H> at the Hamiltonian of that time (no mu term), internal unit
//   atoms             sum_i <n_i> (conserved: a check of the integrator)
//   condensed_atoms   sum_i |phi_i|^2, phi_i = <b_i> complex
//   number_variance   sum_i (<n_i^2> - <n_i>^2): the local number fluctuations, the defect
//                     measure of a pure product state (it has no entropy: each site is pure)
//   doublons          sum_i P_i(2);  multiply_occupied  sum_i sum_{n>=2} P_i(n)
//   holes             sum over the Mott shells of the final ground state (filling k_i) of
//                     P_i(n < k_i);  shell_defects  the same sum of 1 - P_i(k_i)
//   visibility        of the time-of-flight pattern (evolvePictures.ts)
//   hopping, interaction  J along x and U at the trap centre at that time, internal unit

import { columnDensity } from '../imaging/columnDensity.js';
import type { PlanarField } from '../imaging/planarField.js';
import { createObservableWorkspace, evolutionTotals, siteSnapshot, type ObservableWorkspace, type SiteSnapshot } from '../dynamics/dynamicObservables.js';
import type { OutputContext } from '../dynamics/evolve.js';
import type { GutzwillerState } from '../dynamics/gutzwillerState.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import type { EvolveCamera, EvolvePicture } from './evolvePictures.js';

export interface EvolutionSeries {
  time: number[];
  energy: number[];
  atoms: number[];
  condensedAtoms: number[];
  numberVariance: number[];
  doublons: number[];
  multiplyOccupied: number[];
  holes: number[];
  shellDefects: number[];
  visibility: number[];
  hopping: number[];
  interaction: number[];
  maxTopWeight: number[];
  maxNormError: number[];
  steps: number[];
  rejectedSteps: number[];
}

export interface EvolutionSnapshot {
  index: number;
  time: number;
  fields: SiteSnapshot;
  pictures: EvolvePicture[];
}

export interface AnimationFrame {
  time: number;
  /** density and |phi|^2: the field itself (2D), the column along the camera axis (3D), a profile (1D: ny = 1) */
  density: PlanarField;
  condensate: PlanarField;
  /** far-field picture (time of flight or momentum distribution), none for a chain */
  farField: EvolvePicture | null;
}

export interface EvolveRecorder {
  readonly series: EvolutionSeries;
  readonly snapshots: EvolutionSnapshot[];
  readonly frames: AnimationFrame[];
  record(context: OutputContext): void;
}

const emptySeries = (): EvolutionSeries => ({
  time: [],
  energy: [],
  atoms: [],
  condensedAtoms: [],
  numberVariance: [],
  doublons: [],
  multiplyOccupied: [],
  holes: [],
  shellDefects: [],
  visibility: [],
  hopping: [],
  interaction: [],
  maxTopWeight: [],
  maxNormError: [],
  steps: [],
  rejectedSteps: [],
});

/** <n_i> of every site into `out`. */
export function densityInto(state: GutzwillerState, out: Float64Array): void {
  const y = state.amplitudes;
  const S = state.states;
  for (let i = 0; i < state.siteCount; i++) {
    const base = 2 * i * S;
    let m = 0;
    for (let n = 1; n < S; n++) m += n * (y[base + 2 * n] * y[base + 2 * n] + y[base + 2 * n + 1] * y[base + 2 * n + 1]);
    out[i] = m;
  }
}

export interface RecorderOptions {
  resolved: ResolvedScenario;
  camera: EvolveCamera;
  /** Mott filling of every site in the final ground state (0 outside its shells) */
  shellFilling: Int32Array;
  snapshotTimes: readonly number[];
  frameTimes: readonly number[];
  /** label of a time, e.g. 't = 1.5 ms' */
  label: (time: number) => string;
}

export function createEvolveRecorder(options: RecorderOptions): EvolveRecorder {
  const { resolved, camera, shellFilling } = options;
  const n = resolved.geometry.siteCount;
  const shape = resolved.geometry.shape;
  const pad = 3 - shape.length;
  const ws: ObservableWorkspace = createObservableWorkspace(n);
  const density = new Float64Array(n);
  const condensate = new Float64Array(n);
  const snapshotAt = new Set(options.snapshotTimes);
  const frameAt = new Set(options.frameTimes);
  const series = emptySeries();
  const snapshots: EvolutionSnapshot[] = [];
  const frames: AnimationFrame[] = [];
  const axis = camera.optics?.axis ?? 2;
  const planar = (field: Float64Array): PlanarField =>
    shape.length === 1 ? { values: Float64Array.from(field), nx: shape[0], ny: 1 } : shape.length === 2 ? { values: Float64Array.from(field), nx: shape[0], ny: shape[1] } : columnDensity(field, shape, axis);
  return {
    series,
    snapshots,
    frames,
    record({ time, state, frame, statistics }) {
      const t = evolutionTotals(state, frame, ws, shellFilling);
      densityInto(state, density);
      series.time.push(time);
      series.energy.push(t.energy);
      series.atoms.push(t.atoms);
      series.condensedAtoms.push(t.condensedAtoms);
      series.numberVariance.push(t.numberVariance);
      series.doublons.push(t.doublonsExactlyTwo);
      series.multiplyOccupied.push(t.multiplyOccupied);
      series.holes.push(t.shellHoles);
      series.shellDefects.push(t.shellDefects);
      series.visibility.push(camera.visibility(ws.phiRe, ws.phiIm, density));
      series.hopping.push(frame.hopScale[pad] * resolved.units.hopping);
      series.interaction.push(frame.interactionScale * resolved.units.interaction);
      series.maxTopWeight.push(t.maxTopWeight);
      series.maxNormError.push(t.maxNormError);
      series.steps.push(statistics.steps);
      series.rejectedSteps.push(statistics.rejectedSteps);
      const label = options.label(time);
      if (snapshotAt.has(time) && !snapshots.some((s) => s.time === time)) {
        const fields = siteSnapshot(state, frame);
        snapshots.push({ index: snapshots.length, time, fields, pictures: camera.pictures(label, fields.phiRe, fields.phiIm, fields.density) });
      }
      if (frameAt.has(time) && !frames.some((f) => f.time === time)) {
        for (let i = 0; i < n; i++) condensate[i] = ws.phiRe[i] * ws.phiRe[i] + ws.phiIm[i] * ws.phiIm[i];
        const far = camera.pictures(label, ws.phiRe, ws.phiIm, density).find((p) => p.kind !== 'in_situ') ?? null;
        frames.push({ time, density: planar(density), condensate: planar(condensate), farField: far });
      }
    },
  };
}
