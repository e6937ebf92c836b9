// Physical constants, SI units: CODATA 2018 recommended values.
// Source: E. Tiesinga, P. J. Mohr, D. B. Newell, B. N. Taylor, "CODATA recommended values of
// the fundamental physical constants: 2018", Rev. Mod. Phys. 93, 025010 (2021); also
// https://physics.nist.gov/cuu/Constants/. Since the 2019 SI redefinition h, k_B, e, N_A and c
// are exact; the atomic mass unit, the Bohr radius and epsilon_0 are measured (relative
// standard uncertainties 3e-10, 1.5e-10 and 1.5e-10), far below anything tiercake resolves.

/** Planck constant h in J s (exact). */
export const planckJs = 6.62607015e-34;

/** Reduced Planck constant hbar = h / (2 pi) in J s. */
export const hbarJs = planckJs / (2 * Math.PI);

/** Boltzmann constant k_B in J/K (exact). */
export const boltzmannJPerK = 1.380649e-23;

/** Unified atomic mass unit (dalton) in kg. */
export const atomicMassUnitKg = 1.6605390666e-27;

/** Bohr radius a_0 in m. */
export const bohrRadiusM = 5.29177210903e-11;

/** Speed of light in vacuum in m/s (exact). */
export const speedOfLightMPerS = 299792458;

/** Vacuum electric permittivity epsilon_0 in F/m. */
export const vacuumPermittivityFPerM = 8.8541878128e-12;

/** Elementary charge in C (exact). */
export const elementaryChargeC = 1.602176634e-19;

/** Electron mass in kg. */
export const electronMassKg = 9.1093837015e-31;

/** Avogadro constant in 1/mol (exact). */
export const avogadroPerMol = 6.02214076e23;

/** Atomic unit of electric polarisability, 4 pi epsilon_0 a_0^3, in C m^2 / V. */
export const atomicUnitPolarisabilitySI = 4 * Math.PI * vacuumPermittivityFPerM * bohrRadiusM ** 3;
