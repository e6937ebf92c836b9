// Guaranteed lower bounds to the ground energy of a site whose parameters moved a little
// since its last solve: Weyl's inequality for symmetric matrices,
//   lambda_min(A + E) >= lambda_min(A) - ||E||_2
// (Horn & Johnson, Matrix Analysis, 2nd ed., Theorem 4.3.1). A start below the smallest
// eigenvalue makes Laguerre's method converge monotonically (see groundState.ts).

/**
 * Norm of the truncated b + b^+ (largest eigenvalue of the truncated position operator of
 * a harmonic oscillator, bounded by 2 sqrt(nmax)).
 */
export function couplingNormBound(nmax: number): number {
  return 2 * Math.sqrt(nmax);
}

/**
 * A value guaranteed to lie below the ground energy of the site Hamiltonian at
 * (muLocal, psi), given its ground energy `previousEnergy` at (muLocalPrev, psiPrev):
 * ||E|| <= |psi - psiPrev| ||b + b^+|| + |muLocal - muLocalPrev| nmax.
 */
export function weylLowerBound(
  previousEnergy: number,
  psi: number,
  psiPrev: number,
  muLocal: number,
  muLocalPrev: number,
  nmax: number,
): number {
  const shift = Math.abs(psi - psiPrev) * couplingNormBound(nmax) + Math.abs(muLocal - muLocalPrev) * nmax;
  // Relative slack covers rounding in the previous solve.
  return previousEnergy - shift - 1e-12 * (Math.abs(previousEnergy) + 1) - 1e-300;
}
