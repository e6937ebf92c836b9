// A CompareFit holding only what the readings after the fit take from it (equation of state,
// fluctuation thermometry): the prepared scenario, the optics, the measured grid and the best
// values, set by the test instead of fitted. Lets those modules be tested on pictures whose
// truth is written out in the test, without a fit. Grid layout: values[i * ny + j], y up.

import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { CompareFit } from '../../src/pipeline/compareFit.js';
import { prepareScenario, scenarioOptics, type PreparedScenario } from '../../src/pipeline/prepareScenario.js';

/** A dimensionless scenario (energies in U, one camera pixel per site, no blur) written to dir. */
export function stubScenario(dir: string, name: string, body: Record<string, unknown>): PreparedScenario {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 6 }, camera: { cameraPixelSites: 1, psf: { sigmaSites: 0 } }, ...body }));
  return prepareScenario(path);
}

export interface StubValues {
  nx: number;
  ny: number;
  /** Trap centre, grid pixel index (y up). */
  centreX: number;
  centreY: number;
  kT: number;
  mu?: number;
  data?: Float64Array;
  model?: Float64Array;
  sigma?: Float64Array;
}

export function compareFitStub(prepared: PreparedScenario, v: StubValues): CompareFit {
  const optics = scenarioOptics(prepared.resolved);
  const size = v.nx * v.ny;
  const stub = {
    prepared,
    optics,
    measured: { nx: v.nx, ny: v.ny, pixelUm: optics.cellUm, mask: new Uint8Array(size).fill(1), usedPixels: size },
    picture: { centreX: v.centreX, centreY: v.centreY, angleRad: 0, psfSigmaUm: optics.psfSigmaUm, offset: 0 },
    best: { trapFactor: 1, kTInternal: v.kT, muInternal: v.mu ?? 0, nmax: prepared.resolved.scenario.truncation.nmax, converged: true },
    data: v.data ?? new Float64Array(size),
    model: v.model ?? new Float64Array(size),
    sigma: v.sigma ?? new Float64Array(size).fill(1),
    internalPerScenarioUnit: 1,
    energyUnit: 'U',
  };
  return stub as unknown as CompareFit;
}
