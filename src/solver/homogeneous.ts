// Homogeneous Gutzwiller mean-field solution of the Bose-Hubbard model for a lattice of
// coordination number z (Sheshadri et al., EPL 22, 257 (1993); van Oosten, van der
// Straten & Stoof, PRA 63, 053601 (2001)). Every site sees psi = zJ phi, so the
// self-consistency is one equation phi = f(zJ phi), f the site order parameter.
//
// Instead of iterating phi <- f(zJ phi) (which slows down without bound at the phase
// boundary), we solve it as a root problem. phi = 0 is always a solution; a non-zero one
// exists exactly when the linear response beats the hopping, zJ chi > 1 with
// chi = d phi / d psi at psi = 0 (the transition is continuous at T = 0 and T > 0 in this
// model). Then the root of h(phi) = f(zJ phi)/phi - 1 on (0, sqrt(nmax)] is found with
// Brent's method; h(0+) = zJ chi - 1 > 0 and h(sqrt(nmax)) < 0 because |<b>| < sqrt(nmax)
// in the truncated space. This solution is also the minimum of the Landau function
// Omega(phi) = lambda(zJ phi) + zJ phi^2 (Hellmann-Feynman: dOmega/dphi = 2 zJ (phi - f)).

import { brentRoot } from '../numerics/brentRoot.js';
import {
  createSiteObservables,
  createSiteWorkspace,
  solveSite,
  type SiteObservables,
  type SiteWorkspace,
} from './site/index.js';

export interface HomogeneousInput {
  /** coordination number times hopping, zJ (energy unit of the caller) */
  zJ: number;
  interactionU: number;
  mu: number;
  /** k_B T in the same unit; 0 for the ground state */
  temperature: number;
  nmax: number;
}

export interface HomogeneousSolution {
  phi: number;
  /** |phi|^2, the condensate density per site */
  condensateDensity: number;
  density: number;
  /** <n^2> - <n>^2 */
  numberVariance: number;
  /** dn/dmu, central difference */
  compressibility: number;
  /** grand potential per site Omega/N_s = lambda + zJ phi^2 (energy at fixed mu, T = 0) */
  grandPotential: number;
  /** Omega/N_s + mu n: the energy (T = 0) or free energy (T > 0) per site */
  freeEnergy: number;
  entropy: number;
  parityOdd: number;
  topWeight: number;
  /** linear response chi = d phi/d psi at psi = 0; the superfluid edge is zJ chi = 1 */
  susceptibility: number;
  mu: number;
}

/** Linear response of the site order parameter to the field psi at psi = 0. */
export function siteSusceptibility(
  ws: SiteWorkspace,
  interactionU: number,
  mu: number,
  temperature: number,
  scratch: SiteObservables,
): number {
  // phi(psi) = chi psi + O(psi^3): a tiny probe gives chi to ~1e-12 relative.
  const probe = 1e-7 * (Math.abs(interactionU) + Math.abs(mu) + temperature + 1e-300);
  const phi = solveSite(ws, interactionU, mu, probe, temperature, scratch);
  return phi / probe;
}

export interface AtomicSusceptibility {
  /** chi = d phi / d psi at psi = 0 (1/energy) */
  chi: number;
  /** d chi / d mu (1/energy^2) */
  dChiDmu: number;
}

/**
 * The same linear response in closed form. At psi = 0 the site Hamiltonian is diagonal,
 * E_n = U n(n-1)/2 - mu n, with thermal weights p_n; to first order in the coupling
 * -psi (b + b^+), static (isothermal) perturbation theory gives
 *   chi = sum_{n=0}^{nmax-1} (n + 1) (p_n - p_{n+1}) / (E_{n+1} - E_n),  E_{n+1} - E_n = U n - mu,
 * which at T = 0 is the familiar (g + 1)/(U g - mu) + g/(mu - U (g - 1)) of the ground
 * filling g (van Oosten, van der Straten & Stoof, PRA 63, 053601 (2001), eq. for the lobe
 * boundary). Its mu-derivative follows from dp_n/dmu = p_n (n - <n>)/kT. Exact, so the lobe
 * tips can be root-found to machine precision (the probe in siteSusceptibility has ~1e-12
 * relative noise, too much for the flat top of a lobe). Not defined exactly on a
 * degeneracy point mu = U n (there the pair (n, n+1) contributes p_n/kT; returns the limit).
 */
export function atomicSusceptibility(
  interactionU: number,
  mu: number,
  temperature: number,
  nmax: number,
  /** optional scratch of length >= nmax + 1, so repeated calls allocate nothing */
  scratch?: Float64Array,
): AtomicSusceptibility {
  let eMin = Infinity;
  for (let n = 0; n <= nmax; n++) {
    const e = 0.5 * interactionU * n * (n - 1) - mu * n;
    if (e < eMin) eMin = e;
  }
  const p = scratch !== undefined && scratch.length > nmax ? scratch : new Float64Array(nmax + 1);
  let z = 0;
  let mean = 0;
  if (temperature > 0) {
    for (let n = 0; n <= nmax; n++) {
      p[n] = Math.exp(-(0.5 * interactionU * n * (n - 1) - mu * n - eMin) / temperature);
      z += p[n];
    }
  } else {
    // T = 0: the ground filling (the lowest level; ties at a degeneracy share the weight).
    for (let n = 0; n <= nmax; n++) {
      p[n] = 0.5 * interactionU * n * (n - 1) - mu * n === eMin ? 1 : 0;
      z += p[n];
    }
  }
  for (let n = 0; n <= nmax; n++) {
    p[n] /= z;
    mean += n * p[n];
  }
  const beta = temperature > 0 ? 1 / temperature : 0;
  let chi = 0;
  let dChiDmu = 0;
  for (let n = 0; n < nmax; n++) {
    const gap = interactionU * n - mu;
    const dp = p[n] - p[n + 1];
    if (gap === 0) {
      chi += (n + 1) * beta * p[n];
      continue;
    }
    const dpDmu = beta * (p[n] * (n - mean) - p[n + 1] * (n + 1 - mean));
    chi += ((n + 1) * dp) / gap;
    dChiDmu += (n + 1) * (dpDmu / gap + dp / (gap * gap));
  }
  return { chi, dChiDmu };
}

/** Order parameter phi only (fast path used by the phase map). */
export function homogeneousPhi(ws: SiteWorkspace, input: HomogeneousInput, scratch: SiteObservables): number {
  const { zJ, interactionU, mu, temperature } = input;
  if (!(zJ > 0)) return 0;
  const chi = siteSusceptibility(ws, interactionU, mu, temperature, scratch);
  if (!(zJ * chi > 1)) return 0;
  const phiMax = Math.sqrt(ws.nmax);
  const h = (phi: number): number => solveSite(ws, interactionU, mu, zJ * phi, temperature, scratch) / phi - 1;
  const root = brentRoot(h, 0, phiMax, zJ * chi - 1, h(phiMax), 1e-14, 0, 300);
  return root.root;
}

/** Self-consistent homogeneous state at fixed chemical potential. */
export function solveHomogeneous(input: HomogeneousInput, ws?: SiteWorkspace): HomogeneousSolution {
  validate(input);
  const work = ws ?? createSiteWorkspace(input.nmax);
  const scratch = createSiteObservables();
  const { zJ, interactionU, mu, temperature } = input;
  const chi = siteSusceptibility(work, interactionU, mu, temperature, scratch);
  const phi = homogeneousPhi(work, input, scratch);
  const obs = createSiteObservables();
  solveSite(work, interactionU, mu, zJ * phi, temperature, obs);
  const step = 1e-6 * (Math.abs(interactionU) + Math.abs(zJ) + temperature);
  const densityAt = (m: number): number => {
    const p = homogeneousPhi(work, { ...input, mu: m }, scratch);
    solveSite(work, interactionU, m, zJ * p, temperature, scratch);
    return scratch.density;
  };
  const compressibility = (densityAt(mu + step) - densityAt(mu - step)) / (2 * step);
  const grandPotential = obs.energy + zJ * phi * phi;
  return {
    phi,
    condensateDensity: phi * phi,
    density: obs.density,
    numberVariance: obs.densitySq - obs.density * obs.density,
    compressibility,
    grandPotential,
    freeEnergy: grandPotential + mu * obs.density,
    entropy: obs.entropy,
    parityOdd: obs.parityOdd,
    topWeight: obs.topWeight,
    susceptibility: chi,
    mu,
  };
}

export interface FixedDensityInput extends Omit<HomogeneousInput, 'mu'> {
  density: number;
}

/**
 * Homogeneous state at fixed density: mu from Brent's method on n(mu) - target, which is
 * monotone. On a Mott plateau (integer target, insulating) any mu inside the gap fits;
 * the returned mu is where the root finder lands, and the density is exact.
 */
export function solveHomogeneousAtDensity(input: FixedDensityInput): HomogeneousSolution {
  const { density: target, nmax } = input;
  if (!(target >= 0) || !(target < nmax)) {
    throw new Error(`density: expected 0 <= n < nmax = ${nmax}, got ${target}; raise nmax for higher fillings`);
  }
  const ws = createSiteWorkspace(nmax);
  const scratch = createSiteObservables();
  const densityAt = (mu: number): number => {
    const p = homogeneousPhi(ws, { ...input, mu }, scratch);
    solveSite(ws, input.interactionU, mu, input.zJ * p, input.temperature, scratch);
    return scratch.density;
  };
  const scale = Math.abs(input.interactionU) + input.zJ + input.temperature;
  let lo = -2 * input.zJ - scale;
  let hi = input.interactionU * nmax + scale;
  let flo = densityAt(lo) - target;
  let fhi = densityAt(hi) - target;
  for (let k = 0; k < 60 && flo > 0; k++) {
    lo -= scale * 2 ** k;
    flo = densityAt(lo) - target;
  }
  for (let k = 0; k < 60 && fhi < 0; k++) {
    hi += scale * 2 ** k;
    fhi = densityAt(hi) - target;
  }
  const root = brentRoot((mu) => densityAt(mu) - target, lo, hi, flo, fhi, 1e-13 * scale, 1e-13);
  return solveHomogeneous({ ...input, mu: root.root }, ws);
}

function validate(input: HomogeneousInput): void {
  const { zJ, interactionU, temperature, mu } = input;
  if (!(zJ >= 0) || !Number.isFinite(zJ)) throw new Error(`zJ: expected a finite number >= 0, got ${zJ}`);
  if (!(interactionU > 0) || !Number.isFinite(interactionU)) {
    throw new Error(`U: expected a finite number > 0 (repulsive bosons), got ${interactionU}`);
  }
  if (!(temperature >= 0) || !Number.isFinite(temperature)) {
    throw new Error(`temperature: expected a finite number >= 0, got ${temperature}`);
  }
  if (!Number.isFinite(mu)) throw new Error(`mu: expected a finite number, got ${mu}`);
}
