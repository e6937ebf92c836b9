// One call for either regime of the single-site problem, with all observables: T = 0
// (temperature <= 0) the ground state (groundState.ts), T > 0 the thermal state
// (thermalState.ts).

import { groundObservables } from './groundObservables.js';
import { solveSiteGround } from './groundState.js';
import type { SiteObservables } from './siteObservables.js';
import type { SiteWorkspace } from './siteWorkspace.js';
import { solveSiteThermal } from './thermalState.js';

/** Fills `out`, returns phi. `lowerBound` (T = 0 only) must lie below the ground energy, or be NaN. */
export function solveSite(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  temperature: number,
  out: SiteObservables,
  lowerBound = NaN,
): number {
  if (temperature > 0) return solveSiteThermal(ws, interactionU, muLocal, psi, temperature, out);
  const phi = solveSiteGround(ws, interactionU, muLocal, psi, lowerBound);
  groundObservables(ws, phi, out);
  return phi;
}
