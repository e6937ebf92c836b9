// What a camera would record of the evolving cloud, from the complex order parameter of the
// time-dependent Gutzwiller state (plain data; the files are written by
// src/output/evolveOutputs.ts):
//
// - visibility of the time-of-flight interference pattern at every output time
//   (Gerbier et al., PRL 95, 050404 (2005); imaging/interferenceVisibility.ts) from the
//   lattice structure factor B(k) = |sum_i e^{-i k.r_i} phi_i|^2 + sum_i (n_i - |phi_i|^2) with
//   complex phi (observables/momentumStructureFactor.ts takes Im phi). Equal-|k| disks are
//   compared, so an isotropic Wannier envelope cancels; the envelope is left out (the
//   Wannier width changes during a depth ramp). A chain has no second axis: NaN.
// - in-situ pictures through the scenario's camera (imaging/cameraOptics.ts: column,
//   area-weighted resampling, PSF);
// - the far-field time-of-flight picture: laboratory mode through imaging/timeOfFlight.ts
//   (k = m x / (hbar t), Gaussian Wannier envelope of the static lattice, the scenario's
//   flight time); dimensionless mode has no Wannier function and no mass, so the picture is
//   B(k)/M^2 over three Brillouin zones, k in units of 2 hbar k_L = h/a.

import { cameraOptics, cameraPicture, type CameraOptics, type CloudForImaging } from '../imaging/cameraOptics.js';
import { interferenceVisibility } from '../imaging/interferenceVisibility.js';
import { timeOfFlightImage } from '../imaging/timeOfFlight.js';
import { gaussianWannierEnvelope, type MomentumEnvelope } from '../imaging/wannierEnvelope.js';
import { micrometres, type LengthUnit, type PixelPicture } from '../imaging/pixelPicture.js';
import { momentumStructureFactor, type MomentumStructureFactor } from '../observables/momentumStructureFactor.js';
import { defaultTimeOfFlightSettings } from '../scenario/imagingSchema.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import { cloudOf } from './solvePictures.js';

/** A picture with the words its files need. */
export interface EvolvePicture {
  picture: PixelPicture;
  kind: 'in_situ' | 'time_of_flight' | 'momentum';
  title: string;
  description: string;
  quantity: string;
  lengthUnit: LengthUnit;
  axisNames: [string, string];
  axisNote?: string;
  colorMap?: string;
}

const flatEnvelope: MomentumEnvelope = { at: () => 1 };
const latticeMomentum: LengthUnit = { code: 'lattice-momentum', short: '2ħk_L', note: 'units of 2 hbar k_L = h/a (the lattice momentum); dimensionless mode has no length scale' };
const axisLetters = ['x', 'y', 'z'];

export interface EvolveCamera {
  optics: CameraOptics | null;
  /** time-of-flight visibility of a state (NaN for a chain) */
  visibility(phiRe: Float64Array, phiIm: Float64Array, density: Float64Array): number;
  /** in-situ and far-field pictures of a state (none for a chain) */
  pictures(label: string, phiRe: Float64Array, phiIm: Float64Array, density: Float64Array): EvolvePicture[];
}

export function evolveCamera(resolved: ResolvedScenario): EvolveCamera {
  const shape = resolved.geometry.shape;
  const dims = shape.length;
  const tof = resolved.scenario.timeOfFlight ?? defaultTimeOfFlightSettings();
  const diskRadius = tof.visibilityDiskRadiusInTwoHbarKl;
  const cloud: CloudForImaging = cloudOf(resolved, {
    density: new Float64Array(0),
    parityOdd: new Float64Array(0),
    orderParameter: new Float64Array(0),
  });
  const optics = dims >= 2 ? cameraOptics(cloud, resolved.scenario.camera) : null;
  const imagingAxis = (optics?.axis ?? 2) as 0 | 1 | 2;
  const structureOf = (phiRe: Float64Array, phiIm: Float64Array, density: Float64Array): MomentumStructureFactor =>
    momentumStructureFactor({ phiRe, phiIm, density, shape }, { imagingAxis });
  const kept = optics ? optics.keptAxes : [0, 1];
  const names: [string, string] = [axisLetters[kept[0]], axisLetters[kept[1]]];
  const lab = resolved.laboratory;

  return {
    optics,
    visibility(phiRe, phiIm, density) {
      if (dims < 2) return NaN;
      const v = interferenceVisibility(structureOf(phiRe, phiIm, density), {
        latticeSpacingUm: resolved.latticeSpacingUm ?? 1,
        envelope: flatEnvelope,
        diskRadiusInTwoHbarKl: diskRadius,
      });
      return v.visibility;
    },
    pictures(label, phiRe, phiIm, density) {
      if (optics === null) return [];
      const out: EvolvePicture[] = [];
      const inSitu = cameraPicture(density, shape, optics);
      out.push({
        picture: inSitu,
        kind: 'in_situ',
        title: `${resolved.scenario.name}: in situ, ${label}`,
        description: `expected in-situ column density at ${label} through the scenario's camera (column, resampling to pixels, PSF); atoms per pixel`,
        quantity: 'atoms per pixel',
        lengthUnit: optics.lengthUnit,
        axisNames: names,
      });
      const structure = structureOf(phiRe, phiIm, density);
      if (lab !== null && resolved.latticeSpacingUm !== null && cloud.wannierWidthSites !== null) {
        const widths = typeof cloud.wannierWidthSites === 'number' ? [cloud.wannierWidthSites, cloud.wannierWidthSites] : [cloud.wannierWidthSites[kept[0]] ?? cloud.wannierWidthSites[0], cloud.wannierWidthSites[kept[1]] ?? cloud.wannierWidthSites[0]];
        const image = timeOfFlightImage(structure, {
          latticeSpacingUm: resolved.latticeSpacingUm,
          massKg: lab.massKg,
          flightTimeMs: tof.flightTimeMs,
          envelope: gaussianWannierEnvelope([widths[0], widths[1]], resolved.latticeSpacingUm),
          brillouinZones: 3,
        });
        out.push({
          picture: image,
          kind: 'time_of_flight',
          title: `${resolved.scenario.name}: time of flight ${tof.flightTimeMs} ms, ${label}`,
          description:
            `far-field picture after ${tof.flightTimeMs} ms of free flight from the state at ${label}: n(k) = |w(k)|^2 B(k) at k = m x / (hbar t), ` +
            'B from the complex order parameter, Gaussian Wannier envelope of the static lattice depth; atoms per pixel, coordinates from the zero-momentum point',
          quantity: 'atoms per pixel',
          lengthUnit: micrometres,
          axisNames: names,
          axisNote: ' after flight',
          colorMap: 'glacier',
        });
      } else {
        out.push({
          picture: momentumPicture(structure),
          kind: 'momentum',
          title: `${resolved.scenario.name}: momentum distribution, ${label}`,
          description:
            `lattice structure factor B(k)/M^2 of the state at ${label} over three Brillouin zones (no Wannier envelope: dimensionless mode has none); ` +
            'sums to the atom number over one zone; k in units of 2 hbar k_L = h/a',
          quantity: 'atoms per k cell',
          lengthUnit: latticeMomentum,
          axisNames: [`k_${names[0]}`, `k_${names[1]}`],
          colorMap: 'glacier',
        });
      }
      return out;
    },
  };
}

/** B(k)/M^2 on three zones, pixel 1/M in units of 2 hbar k_L, k = 0 at the centre pixel. */
function momentumPicture(structure: MomentumStructureFactor): PixelPicture {
  const m = structure.samplesPerZone;
  const size = 3 * m;
  const offset = size / 2;
  const values = new Float64Array(size * size);
  const zone = new Int32Array(size);
  for (let p = 0; p < size; p++) zone[p] = (((p - offset) % m) + m) % m;
  const scale = 1 / (m * m);
  for (let p = 0; p < size; p++) {
    for (let q = 0; q < size; q++) values[p * size + q] = (structure.coherentPower[zone[p] * m + zone[q]] + structure.incoherentAtoms) * scale;
  }
  const centres = Float64Array.from({ length: size }, (_, p) => (p - offset) / m);
  return { values, nx: size, ny: size, pixelUm: 1 / m, xCentresUm: centres, yCentresUm: centres.slice() };
}

