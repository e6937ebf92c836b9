// The single-site Gutzwiller problem: one primitive per file (see each file's header).
export { POLYNOMIAL_PATH_MAX_STATES, SiteWorkspace, createSiteWorkspace } from './siteWorkspace.js';
export { createSiteObservables, type SiteObservables } from './siteObservables.js';
export { couplingNormBound, weylLowerBound } from './weylBound.js';
export { GroundParameters, solveGround, solveSiteGround } from './groundState.js';
export { groundObservables } from './groundObservables.js';
export { implicitQl } from './implicitQl.js';
export { diagonalizeSite } from './fullSpectrum.js';
export { laguerreStep } from './laguerreStep.js';
export { couplingAt, thermalPhiByEigenvalues } from './thermalCouplings.js';
export { solveSiteThermal } from './thermalState.js';
export { ThermalSweepParameters, thermalFromSpectrum, thermalSweepUpdate } from './thermalWarmStart.js';
export { solveSite } from './solveSite.js';
