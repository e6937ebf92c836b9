// What compare reads off the pictures once the fit is done (DESIGN.md section 4): the
// equation of state from the fitted cloud (compareEquationOfState.ts) and, for a stack of
// two or more shots, the fluctuation thermometry (compareThermometry.ts); a single shot
// says why there is no thermometry. Also the trap centre a user fixed in pixels of the
// given frame, carried into the fit's grid, and every warning of the run in one list.

import { toOrientedFrame } from '../imaging/camera/frameOrientation.js';
import type { CameraWarning } from '../imaging/camera/pixelImage.js';
import type { CompareFit } from './compareFit.js';
import { equationOfState, type EquationOfStateReading } from './compareEquationOfState.js';
import { stackThermometry, type ThermometryReading } from './compareThermometry.js';
import type { PreparedShots } from './measuredShots.js';

/** Two or more shots: a stack (bootstrap over the shots, fluctuation thermometry). */
export function isShotStack(shots: PreparedShots): boolean {
  return shots.perShot.length >= 2;
}

/**
 * A trap centre given as x = column, y = row from the top of the given frame, as the fit
 * takes it: a grid pixel of the oriented frame with y counted up from the bottom row.
 */
export function fixedCentreInGrid(shots: PreparedShots, centre: { x: number; y: number }): { x: number; y: number } {
  const p = toOrientedFrame(shots.map, centre.x, centre.y);
  return { x: p.col, y: shots.measured.ny - 1 - p.row };
}

export interface CompareReadings {
  eos: EquationOfStateReading;
  thermometry: ThermometryReading;
  /** every warning of the run: shots, fit, thermometry, in that order */
  warnings: CameraWarning[];
}

/** `eosBinSites`, `thermometryBinSites`: the bin widths asked for (default: each reading's own). */
export function compareReadings(result: CompareFit, shots: PreparedShots, bins: { eosBinSites?: number; thermometryBinSites?: number }): CompareReadings {
  const eos = equationOfState(result, bins.eosBinSites !== undefined ? { binSites: bins.eosBinSites } : {});
  const thermometry: ThermometryReading = isShotStack(shots)
    ? stackThermometry(result, { shots: shots.shots, imagingVariance: shots.imagingVariance, ...(bins.thermometryBinSites !== undefined ? { binSites: bins.thermometryBinSites } : {}) })
    : { available: false as const, reason: 'a single shot: fluctuation thermometry needs a stack of shots' };
  const warnings = [...shots.warnings, ...result.warnings, ...(thermometry.available ? thermometry.warnings : [])];
  return { eos, thermometry, warnings };
}
