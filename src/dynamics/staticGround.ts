// The static Gutzwiller ground state as the start of an evolution and as the reference of
// the adiabaticity verdict: the lattice solver (runLattice, T = 0, serial) at fixed mu or at
// fixed atom number, then the site amplitudes at the converged field
// (groundStateAmplitudes). The truncation is kept fixed (the dynamics runs at the same
// nmax); a weight on |nmax> above `topWeightMax` is reported, not repaired.

import type { LatticeModel } from '../lattice/latticeModel.js';
import { runLattice, type RunOutcome } from '../solver/runLattice.js';
import { createSweepExecutor } from '../solver/sweepExecutor.js';
import { groundStateAmplitudes, type GroundAmplitudes } from './gutzwillerState.js';

export type GroundChemistry = { kind: 'mu'; mu: number } | { kind: 'atoms'; atoms: number; relativeTolerance?: number };

export interface StaticGroundRequest {
  model: LatticeModel;
  chemical: GroundChemistry;
  /** solver tolerance on phi; default 1e-12 (a looser start is not stationary) */
  tolerance?: number;
  maxSweeps?: number;
  /** default 1e-6 */
  topWeightMax?: number;
}

export interface StaticGround extends GroundAmplitudes {
  mu: number;
  /** converged real order parameter of the static solver */
  phi: Float64Array;
  /** mean-field energy <H> (no mu term) */
  energy: number;
  atoms: number;
  converged: boolean;
  truncationOk: boolean;
  outcome: RunOutcome;
}

export async function staticGroundState(request: StaticGroundRequest): Promise<StaticGround> {
  const tolerance = request.tolerance ?? 1e-12;
  const chemical =
    request.chemical.kind === 'mu'
      ? { kind: 'mu' as const, mu: request.chemical.mu }
      : { kind: 'atoms' as const, atoms: request.chemical.atoms, relativeTolerance: request.chemical.relativeTolerance ?? 1e-10 };
  const outcome = await runLattice(
    {
      model: request.model,
      chemical,
      thermal: { kind: 'temperature', kT: 0 },
      tolerance,
      maxSweeps: request.maxSweeps ?? 500_000,
      accelerate: true,
      truncation: { automatic: false, topWeightMax: request.topWeightMax ?? 1e-6, nmaxLimit: request.model.nmax },
      compressibility: false,
    },
    (state) => createSweepExecutor(state, null, 1),
  );
  const phi = Float64Array.from(outcome.state.fields.phi);
  const mu = outcome.solve.mu;
  const amplitudes = groundStateAmplitudes(outcome.model, phi, mu);
  return {
    ...amplitudes,
    mu,
    phi,
    energy: outcome.solve.totals.freeEnergy,
    atoms: outcome.solve.totals.atoms,
    converged: outcome.converged,
    truncationOk: outcome.truncation.ok,
    outcome,
  };
}
