// What changes the Hamiltonian in time: ramps of the hopping, the interaction, the lattice
// depth, and the site potential, applied to a DynamicsFrame at the time of every
// right-hand-side evaluation. The frame's base values are those of the static model; the
// drive sets the scale factors relative to them:
//
//   J_ij(t) = hoppingFactor(t) * [J(s(t)) / J(s0) on axes driven by the depth] * J_ij(base)
//   U_i(t)  = interactionFactor(t) * prod_{driven axes} [W4(s(t)) / W4(s0)] * U_i(base)
//
// with J(s) and W4(s) = int |w|^4 dx from the band structure of one lattice axis at depth s
// (in E_r), tabulated once (depthInterpolation.ts; U is proportional to the product of the
// Wannier overlaps of the lattice axes, hubbardParameters.ts). Axes without a lattice and
// axes not driven keep their values. Where the base model has per-site J and U from a beam
// envelope, the uniform ratio at the central depth is an approximation (the local depths
// scale with s, but J(s) is not proportional to s): `envelopeApproximation` says so.

import type { LatticeGeometry } from '../lattice/latticeGeometry.js';
import { addHarmonicTrap } from '../lattice/harmonicTrap.js';
import type { LatticeAxisInterpolator } from '../physics/depthInterpolation.js';
import { ParameterError } from '../physics/parameterError.js';
import type { DynamicsFrame } from './dynamicsFrame.js';
import type { TimeFunction } from './timeFunction.js';

export interface Drive {
  /** set the frame to the Hamiltonian at `time` (the left limit at a jump when leftLimit) */
  apply(time: number, frame: DynamicsFrame, leftLimit: boolean): void;
  /** ascending times of kinks and jumps of any driven parameter */
  readonly breakpoints: readonly number[];
  /** true when per-site J/U of the base model are rescaled by the central-depth ratio */
  readonly envelopeApproximation: boolean;
}

/** Rewrites the site potential at a time (moving or changing trap, switching disorder). */
export interface PotentialDrive {
  apply(time: number, eps: Float64Array, leftLimit: boolean): void;
  readonly breakpoints: readonly number[];
}

export interface LatticeDepthDrive {
  /** depth s(t) in E_r of every driven lattice axis */
  depthEr: TimeFunction;
  /** depth of the static model (where the scale factors are 1) */
  baseDepthEr: number;
  /** J(s) and W4(s) of one axis, sampled over the range s(t) covers */
  table: LatticeAxisInterpolator;
  /** physical axes whose lattice follows s(t); default all */
  axes?: readonly number[];
}

export interface DriveSpec {
  hoppingFactor?: TimeFunction;
  interactionFactor?: TimeFunction;
  latticeDepth?: LatticeDepthDrive;
  potential?: PotentialDrive;
}

function mergedBreakpoints(lists: ReadonlyArray<readonly number[]>): number[] {
  const all = lists.flatMap((l) => [...l]).sort((a, b) => a - b);
  return all.filter((t, k) => k === 0 || t !== all[k - 1]);
}

/**
 * A drive from its parts. `frame` is the static frame it will drive (for the dimension and
 * to tell whether the base model is site-resolved).
 */
export function createDrive(frame: DynamicsFrame, spec: DriveSpec): Drive {
  const dims = frame.dims;
  const pad = 3 - dims;
  const depth = spec.latticeDepth;
  const axes = depth ? [...(depth.axes ?? Array.from({ length: dims }, (_, d) => d))] : [];
  for (const d of axes) {
    if (!Number.isInteger(d) || d < 0 || d >= dims) throw new ParameterError('latticeDepth.axes', `expected physical axes 0..${dims - 1}, got ${d}`);
  }
  let baseJ = NaN;
  let baseW4 = NaN;
  if (depth) {
    baseJ = depth.table.tunnellingEr(depth.baseDepthEr);
    baseW4 = depth.table.integralW4PerSite(depth.baseDepthEr);
  }
  const siteResolved = frame.interactionArray !== null || frame.hopArrays.some((h) => h !== null);
  const breakpoints = mergedBreakpoints([
    spec.hoppingFactor?.breakpoints ?? [],
    spec.interactionFactor?.breakpoints ?? [],
    depth?.depthEr.breakpoints ?? [],
    spec.potential?.breakpoints ?? [],
  ]);
  const driven = new Uint8Array(3);
  for (const d of axes) driven[pad + d] = 1;
  return {
    breakpoints,
    envelopeApproximation: depth !== undefined && siteResolved,
    apply(time, f, leftLimit) {
      const hop = spec.hoppingFactor ? spec.hoppingFactor.valueAt(time, leftLimit) : 1;
      let interaction = spec.interactionFactor ? spec.interactionFactor.valueAt(time, leftLimit) : 1;
      let depthHop = 1;
      if (depth) {
        const s = depth.depthEr.valueAt(time, leftLimit);
        depthHop = depth.table.tunnellingEr(s) / baseJ;
        const w4 = depth.table.integralW4PerSite(s) / baseW4;
        for (let k = 0; k < axes.length; k++) interaction *= w4;
      }
      for (let a = 0; a < 3; a++) f.hopScale[a] = driven[a] ? hop * depthHop : hop;
      f.interactionScale = interaction;
      if (spec.potential) spec.potential.apply(time, f.eps, leftLimit);
    },
  };
}

export interface HarmonicTrapSchedule {
  /** trap coefficient k_d(t) per physical axis, energy per site^2 (eps = sum_d k_d (x_d - c_d)^2) */
  coefficient: readonly TimeFunction[];
  /** trap centre c_d(t) per physical axis, sites */
  centre: readonly TimeFunction[];
}

/**
 * eps_i(t) = background_i + sum_d k_d(t) (x_d - c_d(t))^2: a trap that moves (dipole
 * excitation) or changes its frequency; `background` holds disorder and anything else.
 */
export function harmonicTrapDrive(geometry: LatticeGeometry, background: Float64Array, schedule: HarmonicTrapSchedule): PotentialDrive {
  const dims = geometry.dims;
  if (schedule.coefficient.length !== dims || schedule.centre.length !== dims) {
    throw new ParameterError('trap schedule', `expected ${dims} coefficient and ${dims} centre functions (one per axis)`);
  }
  if (background.length !== geometry.siteCount) {
    throw new ParameterError('trap background', `expected ${geometry.siteCount} site energies, got ${background.length}`);
  }
  const coefficient = new Array<number>(dims).fill(0);
  const centre = new Array<number>(dims).fill(0);
  const trap = { coefficient, centre };
  return {
    breakpoints: mergedBreakpoints([...schedule.coefficient, ...schedule.centre].map((f) => f.breakpoints)),
    apply(time, eps, leftLimit) {
      for (let d = 0; d < dims; d++) {
        coefficient[d] = schedule.coefficient[d].valueAt(time, leftLimit);
        centre[d] = schedule.centre[d].valueAt(time, leftLimit);
      }
      eps.set(background);
      addHarmonicTrap(geometry, trap, eps);
    },
  };
}
