// The two static states of `tiercake evolve`: the start (the scenario's T = 0 Gutzwiller
// ground state at its N or mu, solved tighter than a plain solve so that it is stationary
// under the equations of motion) and the reference of the adiabaticity verdict (the ground
// state of the Hamiltonian at the end of the evolution with the same atom number and the
// same truncation; src/dynamics/adiabaticity.ts). Both go through runLattice; their site
// amplitudes come from groundStateAmplitudes (src/dynamics/gutzwillerState.ts).

import type { DynamicsFrame } from '../dynamics/dynamicsFrame.js';
import { groundStateAmplitudes, type GroundAmplitudes } from '../dynamics/gutzwillerState.js';
import type { LatticeModel } from '../lattice/latticeModel.js';
import { siteFieldsFrom, type SiteFields } from '../observables/siteFields.js';
import { siteArraysOf } from '../solver/siteArrays.js';
import type { SiteClassification } from '../observables/siteClassification.js';
import { runLattice, type RunOutcome, type RunProgress } from '../solver/runLattice.js';
import { createSweepExecutor, type SweepPool } from '../solver/sweepExecutor.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import { classifyOutcome } from './runRequest.js';

/** The start must be stationary: solve to this tolerance on phi at least. */
export const GROUND_TOLERANCE = 1e-11;

export interface StaticState {
  outcome: RunOutcome;
  fields: SiteFields;
  classification: SiteClassification;
  amplitudes: GroundAmplitudes;
}

/** The lattice model of the Hamiltonian a frame holds (the drive applied at some time). */
export function modelOfFrame(frame: DynamicsFrame, base: LatticeModel): LatticeModel {
  const pad = 3 - base.geometry.dims;
  const hopping = base.hopping.map((h, d) => {
    const scale = frame.hopScale[pad + d];
    if (typeof h === 'number') return scale * h;
    const out = new Float64Array(h.length);
    for (let i = 0; i < h.length; i++) out[i] = scale * h[i];
    return out;
  });
  const u = base.interactionU;
  let interactionU: number | Float64Array;
  if (typeof u === 'number') interactionU = frame.interactionScale * u;
  else {
    interactionU = new Float64Array(u.length);
    for (let i = 0; i < u.length; i++) interactionU[i] = frame.interactionScale * u[i];
  }
  return { geometry: base.geometry, nmax: base.nmax, eps: Float64Array.from(frame.eps), interactionU, hopping };
}

export interface GroundRequest {
  resolved: ResolvedScenario;
  model: LatticeModel;
  chemical: { kind: 'mu'; mu: number } | { kind: 'atoms'; atoms: number; relativeTolerance: number };
  /** raise nmax when |nmax> carries weight (the start); keep it (the reference) */
  automaticTruncation: boolean;
  pool: SweepPool | null;
  threads: number;
  observer?: (p: RunProgress) => void | 'stop';
}

export async function groundState(request: GroundRequest): Promise<StaticState> {
  const s = request.resolved.scenario;
  const outcome = await runLattice(
    {
      model: request.model,
      chemical: request.chemical,
      thermal: { kind: 'temperature', kT: 0 },
      tolerance: Math.min(s.solver.tolerance, GROUND_TOLERANCE),
      maxSweeps: s.solver.maxSweeps,
      accelerate: s.solver.accelerate,
      truncation: {
        automatic: request.automaticTruncation && s.truncation.automatic,
        topWeightMax: s.truncation.topWeightMax,
        nmaxLimit: request.automaticTruncation ? Math.max(s.truncation.nmax, 40) : request.model.nmax,
      },
      compressibility: false,
      ...(request.observer ? { observer: request.observer } : {}),
    },
    (state) => createSweepExecutor(state, request.pool, request.threads),
  );
  const fields = siteFieldsFrom(siteArraysOf(outcome.state), null);
  const classification = classifyOutcome(request.resolved, outcome, fields, false, false);
  const amplitudes = groundStateAmplitudes(outcome.model, Float64Array.from(outcome.state.fields.phi), outcome.solve.mu);
  return { outcome, fields, classification, amplitudes };
}
