// Stage 1 of every run: a scenario file (and --set overrides) -> validated scenario ->
// model arrays (ResolvedScenario), refusing what cannot run before anything big is
// allocated or solved: a lattice too large for the memory given, an atom number above the
// capacity of the truncation, a chemical potential beyond what nmax can hold, camera
// settings that do not fit the lattice. Every refusal is an InputError naming the field.
// Reads only the scenario file (through src/scenario); no console, no clock.

import { dirname } from 'node:path';
import { InputError } from '../scenario/inputError.js';
import { loadScenario } from '../scenario/loadScenario.js';
import { estimateMemoryBytes, resolveScenario, type ResolvedScenario } from '../scenario/resolveScenario.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { ParameterError } from '../physics/parameterError.js';
import { cameraOptics, type CameraOptics } from '../imaging/cameraOptics.js';
import type { CameraSettings } from '../scenario/imagingSchema.js';
import { NMAX_CEILING } from './runRequest.js';

export interface PreparedScenario {
  scenario: Scenario;
  /** the scenario JSON with the overrides applied */
  raw: Record<string, unknown>;
  resolved: ResolvedScenario;
  /** what the --set overrides switched (an alternative key dropped), for the command to print */
  overrideNotes: string[];
}

export interface PrepareOptions {
  /** memory the run may use, bytes; the command line passes a share of the machine's */
  memoryLimitBytes?: number;
}

/** Used when the caller gives no limit: 8 GiB. */
export const DEFAULT_MEMORY_LIMIT_BYTES = 8 * 2 ** 30;

/** Validate, resolve and refuse what cannot run; allocates only the model arrays. */
export function prepareScenario(path: string, overrides: readonly string[] = [], options: PrepareOptions = {}): PreparedScenario {
  const { scenario, raw, notes } = loadScenario(path, overrides);
  const sites = scenario.lattice.shape.reduce((a, b) => a * b, 1);
  const t = scenario.temperature;
  const thermal = (t.kT ?? 0) > 0 || (t.nanokelvin ?? 0) > 0 || (t.entropyPerAtom ?? 0) > 0;
  const bytes = estimateMemoryBytes(sites, true, thermal, scenario.truncation.nmax);
  const limit = options.memoryLimitBytes ?? DEFAULT_MEMORY_LIMIT_BYTES;
  if (bytes > limit) {
    throw new InputError(
      `lattice.shape: ${scenario.lattice.shape.join(' x ')} = ${sites} sites needs about ${(bytes / 2 ** 30).toFixed(1)} GiB, ` +
        `more than the ${(limit / 2 ** 30).toFixed(1)} GiB this machine can spare; use a smaller lattice`,
    );
  }
  // Files named in the scenario (landscape terms) are relative to the scenario's folder.
  const resolved = resolveScenario(scenario, { scenarioDirectory: dirname(path) });
  checkPhysicalConsistency(resolved);
  checkCamera(resolved);
  return { scenario, raw, resolved, overrideNotes: notes };
}

/**
 * The scenario's camera (or the default one) resolved against its lattice, before any
 * field exists; a setting that does not fit the lattice is an InputError naming it.
 */
export function scenarioOptics(resolved: ResolvedScenario, camera: CameraSettings | undefined = resolved.scenario.camera): CameraOptics {
  try {
    return cameraOptics(
      {
        name: resolved.scenario.name,
        shape: resolved.geometry.shape,
        latticeSpacingUm: resolved.latticeSpacingUm,
        massKg: null,
        density: new Float64Array(0),
        parityOdd: new Float64Array(0),
        orderParameter: new Float64Array(0),
        trapCentre: resolved.trapCentre,
        wannierWidthSites: null,
      },
      camera,
    );
  } catch (err) {
    throw asInputError(err);
  }
}

/** Camera settings are checked against the lattice now, not after the solve. */
function checkCamera(resolved: ResolvedScenario): void {
  scenarioOptics(resolved);
}

/** A ParameterError names a scenario key (e.g. camera.psf): it becomes an InputError; anything else is a bug. */
export function asInputError(err: unknown): unknown {
  return err instanceof ParameterError ? new InputError(err.message) : err;
}

/** Inputs that validate but cannot give a meaningful answer. */
function checkPhysicalConsistency(resolved: ResolvedScenario): void {
  const { scenario, model, chemical } = resolved;
  const nmax = scenario.truncation.nmax;
  if (chemical.kind === 'atoms') {
    const capacity = model.geometry.siteCount * nmax;
    if (chemical.atoms >= capacity) {
      throw new InputError(
        `particles.atoms: ${chemical.atoms} atoms cannot fit on ${model.geometry.siteCount} sites with at most nmax = ${nmax} per site; ` +
          `raise truncation.nmax or enlarge lattice.shape`,
      );
    }
  } else {
    const u = typeof model.interactionU === 'number' ? model.interactionU : Math.min(...model.interactionU);
    let minEps = Infinity;
    for (let i = 0; i < model.eps.length; i++) if (model.eps[i] < minEps) minEps = model.eps[i];
    const expectedFilling = Math.ceil((chemical.mu - minEps) / u);
    const ceiling = Math.max(nmax, NMAX_CEILING);
    if (expectedFilling >= 60) {
      throw new InputError(
        `particles.chemicalPotential: gives about ${expectedFilling} atoms per site at the trap centre, beyond what a Gutzwiller ` +
          `truncation can hold (nmax <= 60); lower particles.chemicalPotential`,
      );
    }
    if (expectedFilling >= ceiling && scenario.truncation.automatic) {
      throw new InputError(
        `truncation.nmax: the chemical potential gives about ${expectedFilling} atoms per site at the trap centre, above the ` +
          `automatic limit nmax = ${ceiling}; set truncation.nmax to at least ${expectedFilling + 3}`,
      );
    }
    if (expectedFilling >= nmax && !scenario.truncation.automatic) {
      throw new InputError(
        `truncation.nmax: the chemical potential gives about ${expectedFilling} atoms per site at the trap centre, ` +
          `but nmax = ${nmax}; raise truncation.nmax above ${expectedFilling} or set truncation.automatic to true`,
      );
    }
  }
}
