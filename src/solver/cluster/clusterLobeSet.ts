// The Mott lobes of cluster mean field for a phase map: which fillings fit the mu range,
// the truncation each lobe is computed with, and the published quantum Monte Carlo tip of
// the n = 1 lobe on the lattice the cluster shape implies, as the reference a reader
// compares with.

import { clusterLobeBoundary, type ClusterLobeBoundary } from './clusterLobes.js';

/** Largest cluster Fock dimension a lobe is computed with (a 2x2x2 cluster at nmax 3). */
export const LOBE_MAX_STATES = 65536;

export interface ClusterLobe extends ClusterLobeBoundary {
  /** truncation of the lobe's cluster problem */
  nmax: number;
}

export interface MonteCarloTip {
  lattice: string;
  /** coordination number */
  z: number;
  /** (U/J)c of the n = 1 tip */
  criticalUOverJ: number;
  zJOverU: number;
  source: string;
}

/**
 * n = 1 tips from quantum Monte Carlo: square lattice 16.74 (Capogrosso-Sansone, Soyler,
 * Prokof'ev & Svistunov, PRA 77, 015602 (2008)); simple cubic 29.34 (Capogrosso-Sansone,
 * Prokof'ev & Svistunov, PRB 75, 134302 (2007)). None for chains here.
 */
export function monteCarloTip(dims: number): MonteCarloTip | null {
  if (dims === 2) return { lattice: 'square', z: 4, criticalUOverJ: 16.74, zJOverU: 4 / 16.74, source: "Capogrosso-Sansone, Soyler, Prokof'ev & Svistunov, PRA 77, 015602 (2008)" };
  if (dims === 3) return { lattice: 'simple cubic', z: 6, criticalUOverJ: 29.34, zJOverU: 6 / 29.34, source: "Capogrosso-Sansone, Prokof'ev & Svistunov, PRB 75, 134302 (2007)" };
  return null;
}

/** Truncation for the lobe of filling n: up to n + 3, within LOBE_MAX_STATES; null if even n + 1 does not fit. */
export function lobeTruncation(shape: readonly number[], filling: number): number | null {
  const sites = shape.reduce((a, b) => a * b, 1);
  for (let nmax = filling + 3; nmax >= filling + 1; nmax--) if ((nmax + 1) ** sites <= LOBE_MAX_STATES) return nmax;
  return null;
}

/** Fillings whose interval (n - 1, n) of mu/U meets [muMin, muMax], at most `most`. */
export function lobeFillings(muMin: number, muMax: number, most = 3): number[] {
  const out: number[] = [];
  for (let n = Math.max(1, Math.floor(muMin) + 1); n - 1 < muMax && out.length < most; n++) out.push(n);
  return out;
}

/** The lobes of `shape` for the fillings given (skipping those whose truncation does not fit). */
export function clusterLobes(shape: readonly number[], fillings: readonly number[], points: number, onLobe?: (filling: number) => void): ClusterLobe[] {
  const out: ClusterLobe[] = [];
  for (const filling of fillings) {
    const nmax = lobeTruncation(shape, filling);
    if (nmax === null) continue;
    onLobe?.(filling);
    out.push({ ...clusterLobeBoundary(shape, nmax, filling, points), nmax });
  }
  return out;
}
