// Landscape terms: site potentials a scenario adds to the trap (issue 16), each a pure
// function of the lattice geometry returning site energies in the caller's energy unit.
export { axisOffsets } from './axisOffsets.js';
export { gradientPotential, type GradientTerm } from './gradientPotential.js';
export { boxPotential, type BoxShape, type BoxTerm } from './boxPotential.js';
export { imagePotential, type ImagePlacement, type ImagePotentialResult, type ImageResampling, type PotentialImage } from './imagePotential.js';
export { alongAxis, standingWavePotential, standingWaveProfile, type StandingWaveTerm } from './standingWavePotential.js';
