// Small lattice models shared by the dynamics tests.
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel, type LatticeModel } from '../../src/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../../src/lattice/harmonicTrap.js';

/** Open lattice with a centred harmonic trap eps = k sum_d (x_d - c_d)^2, U = 1. */
export function trappedModel(shape: number[], hopping: number, coefficient: number, nmax: number, centre?: number[]): LatticeModel {
  const g = createLatticeGeometry(shape, shape.map(() => false));
  const model = uniformModel(g, 1, hopping, nmax);
  addHarmonicTrap(g, { coefficient: shape.map(() => coefficient), centre: centre ?? latticeCentre(g) }, model.eps);
  return model;
}

/** Periodic uniform lattice, U = 1. */
export function uniformPeriodic(shape: number[], hopping: number, nmax: number): LatticeModel {
  return uniformModel(createLatticeGeometry(shape, shape.map(() => true)), 1, hopping, nmax);
}
