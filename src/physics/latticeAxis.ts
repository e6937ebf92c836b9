// Everything tiercake needs from one lattice axis at depth s (in E_r): hopping to the nearest
// and next-nearest neighbour, the Wannier overlap int |w|^4, the Wannier width and the band
// gap, all in lattice units (E_r, lattice spacing). Combines bandStructure.ts and wannier.ts;
// hubbardParameters.ts turns these into laboratory units.
//
// Round-off: every Bloch energy carries an absolute rounding error (about 1e-15 E_r with the
// bisection solver), so a hopping amplitude smaller than that is noise. The noise floor is read off the
// highest Fourier coefficients the quasi-momentum grid resolves (J_n for n near M/2), which
// are physically far below it for every accepted depth.

import { bandEdgesFromBand, latticeBand1d, type LatticeBandOptions } from './bandStructure.js';
import { ParameterError, requireFiniteInRange } from './parameterError.js';
import { tunnellingEr, wannierFunction1d } from './wannier.js';

/** Shallowest lattice axis accepted: below it a single-band Hubbard model has no meaning. */
export const minAxisDepthEr = 0.5;
/**
 * Deepest lattice axis accepted: at 200 E_r J ~ 6e-11 E_r is still resolved to ~1e-4; deeper
 * axes are frozen for any experiment and are better described as harmonic confinement.
 */
export const maxAxisDepthEr = 200;

export interface LatticeAxisParameters {
  depthEr: number;
  /** Nearest-neighbour hopping J (> 0), E_r. */
  tunnellingEr: number;
  /** Next-nearest-neighbour hopping J_2 (negative for the lowest band), E_r. */
  nextNearestTunnellingEr: number;
  /** Round-off level of the hopping amplitudes, E_r. */
  tunnellingNoiseFloorEr: number;
  /** False when |J_2| is within 10x the round-off floor (then |J_2 / J| is smaller still). */
  nextNearestResolved: boolean;
  /** int |w|^4 dx in units of 1/a. */
  integralW4PerSite: number;
  /** rms width of the Wannier function, sites. */
  wannierSpreadSites: number;
  /** E_1(edge) - E_0(edge), E_r. */
  bandGapEr: number;
  /** Mean energy of band 1 minus mean energy of band 0, E_r. */
  meanBandSpacingEr: number;
  /** Width of the lowest band, E_r. */
  lowestBandWidthEr: number;
}

/**
 * Band structure, Wannier function and hopping of one lattice axis.
 * @param parameter name of the depth field for error messages.
 */
export function latticeAxisParameters(
  depthEr: number,
  options: LatticeBandOptions = {},
  parameter = 'depthEr',
): LatticeAxisParameters {
  if (typeof depthEr === 'number' && depthEr > maxAxisDepthEr) {
    throw new ParameterError(
      parameter,
      `lattice depth ${depthEr} E_r is beyond ${maxAxisDepthEr} E_r, where hopping vanishes (below 1e-10 E_r); ` +
        'describe a frozen axis by its harmonic confinement (trap frequency of one well) instead',
    );
  }
  requireFiniteInRange(parameter, depthEr, minAxisDepthEr, maxAxisDepthEr, 'recoil energies (E_r)');
  const band = latticeBand1d(depthEr, options);
  const wannier = wannierFunction1d(band);
  const edges = bandEdgesFromBand(band);
  const M = band.quasiMomentumCount;
  let floor = 0;
  for (let n = M / 2 - 4; n < M / 2; n++) floor = Math.max(floor, Math.abs(tunnellingEr(band, n)));
  const J2 = tunnellingEr(band, 2);
  return {
    depthEr,
    tunnellingEr: tunnellingEr(band, 1),
    nextNearestTunnellingEr: J2,
    tunnellingNoiseFloorEr: floor,
    nextNearestResolved: Math.abs(J2) > 10 * floor,
    integralW4PerSite: wannier.integralW4PerSite,
    wannierSpreadSites: wannier.spreadSites,
    bandGapEr: edges.bandGapEr,
    meanBandSpacingEr: edges.meanBandSpacingEr ?? Number.NaN,
    lowestBandWidthEr: edges.lowestWidthEr,
  };
}
