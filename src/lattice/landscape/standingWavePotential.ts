// A second standing wave sampled at the sites: eps_i = V2 sin^2(pi x_i / P + phi), with x_i
// the site index along the chosen axis (x = 0 at site 0), P the period of sin^2 in lattice
// sites (= lambda_2 / lambda_1 for collinear beams: a standing wave of wavelength lambda_2 has
// period lambda_2 / 2, the main lattice's spacing is lambda_1 / 2) and phi its phase. With an
// irrational P this is the quasi-periodic (Aubry-Andre) potential of Bose-glass studies
// (Aubry & Andre, Ann. Israel Phys. Soc. 3, 133 (1980); Roati et al., Nature 453, 895 (2008)).
// Sampling at site centres neglects the Wannier width; src/physics/combinedLatticeWannier.ts
// gives the Wannier-averaged on-site energies (and J, U) of the combined lattice.

import type { LatticeGeometry } from '../latticeGeometry.js';
import { ParameterError } from '../../physics/parameterError.js';

export interface StandingWaveTerm {
  /** physical lattice axis (0 = x) */
  axis: number;
  /** amplitude V2 in the caller's energy unit */
  amplitude: number;
  /** period of sin^2 in lattice sites */
  periodSites: number;
  /** phase in radians */
  phaseRad: number;
}

/** V2 sin^2(pi x / P + phi) along one axis, per site index (length = sites along the axis). */
export function standingWaveProfile(siteCount: number, term: StandingWaveTerm): Float64Array {
  if (!(term.periodSites > 0) || !Number.isFinite(term.periodSites)) {
    throw new ParameterError('periodSites', `expected a positive period in sites, got ${term.periodSites}`);
  }
  if (!Number.isFinite(term.amplitude)) throw new ParameterError('amplitude', `expected a finite number, got ${term.amplitude}`);
  if (!Number.isFinite(term.phaseRad)) throw new ParameterError('phaseRad', `expected a finite phase, got ${term.phaseRad}`);
  const out = new Float64Array(siteCount);
  for (let k = 0; k < siteCount; k++) {
    const s = Math.sin((Math.PI * k) / term.periodSites + term.phaseRad);
    out[k] = term.amplitude * s * s;
  }
  return out;
}

/** Spreads a per-coordinate profile along physical axis `axis` over the whole lattice (flat C order). */
export function alongAxis(geometry: LatticeGeometry, axis: number, profile: Float64Array): Float64Array {
  if (!Number.isInteger(axis) || axis < 0 || axis >= geometry.dims) {
    throw new ParameterError('axis', `expected a lattice axis from 0 to ${geometry.dims - 1}, got ${axis}`);
  }
  if (profile.length !== geometry.shape[axis]) {
    throw new ParameterError('profile', `expected ${geometry.shape[axis]} values along axis ${axis}, got ${profile.length}`);
  }
  const inner = 3 - geometry.dims + axis;
  const [n0, n1, n2] = geometry.inner;
  const out = new Float64Array(geometry.siteCount);
  let i = 0;
  for (let a = 0; a < n0; a++) {
    for (let b = 0; b < n1; b++) {
      for (let c = 0; c < n2; c++) out[i++] = profile[inner === 0 ? a : inner === 1 ? b : c];
    }
  }
  return out;
}

/** Site energies of a second standing wave sampled at the site centres (flat C order). */
export function standingWavePotential(geometry: LatticeGeometry, term: StandingWaveTerm): Float64Array {
  if (!Number.isInteger(term.axis) || term.axis < 0 || term.axis >= geometry.dims) {
    throw new ParameterError('axis', `expected a lattice axis from 0 to ${geometry.dims - 1}, got ${term.axis}`);
  }
  return alongAxis(geometry, term.axis, standingWaveProfile(geometry.shape[term.axis], term));
}
