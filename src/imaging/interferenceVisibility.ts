// Visibility of the time-of-flight interference pattern, defined as in Gerbier et al.,
// PRL 95, 050404 (2005):
//
//   V = (n_max - n_min) / (n_max + n_min),
//
// n_max: atoms in small disks around the four first-order peaks, k = 2 pi / a along +-x
// and +-y; n_min: atoms in disks of the same size at the same |k| along the four
// diagonals. Comparing equal |k| cancels the smooth envelope |w~(k)|^2 when it is
// isotropic (the Gaussian one is), so V measures the coherent part alone: V = 0 when
// phi = 0 everywhere (Mott insulator, thermal gas) and V -> 1 for a large phase-coherent
// superfluid, whose interference weight is concentrated in the peaks.
//
// Disk radius: a choice, not part of the definition; default 0.15 in units of
// 2 hbar k_L = 2 pi / a (0.3 of the half-width of the Brillouin zone), wide enough to
// hold the whole peak of a cloud more than about 7 sites across, small enough to stay
// well clear of the zero-order peak and of the neighbouring disks. Reported with the result.
//
// Quadrature, over n(k) = |w~(k)|^2 [C(k) + I] in each disk:
// - coherent part C: the FFT grid points (spacing dk = 2 pi / (M a)) in the disk, edge
//   points weighted by the fraction of their cell inside (8 x 8 sub-samples). C is a
//   trigonometric polynomial of degree < M, which this grid integrates essentially
//   exactly, so sharp peaks are counted correctly.
// - incoherent part I: a polar midpoint rule (48 radii x 96 angles) rotated with each
//   disk, so that for an isotropic envelope all eight disks get bit-for-bit the same
//   weight and a state with phi = 0 gives V = 0 up to rounding.

import type { MomentumStructureFactor } from '../observables/momentumStructureFactor.js';
import type { MomentumEnvelope } from './wannierEnvelope.js';
import type { PixelPicture } from './pixelPicture.js';

export interface VisibilityOptions {
  latticeSpacingUm: number;
  envelope: MomentumEnvelope;
  /** Disk radius in units of 2 hbar k_L = 2 pi / a; default 0.15. */
  diskRadiusInTwoHbarKl?: number;
}

export interface InterferenceVisibility {
  visibility: number;
  /** Atoms in the four disks at the first-order peaks. */
  peakAtoms: number;
  /** Atoms in the four diagonal disks. */
  diagonalAtoms: number;
  diskRadiusInTwoHbarKl: number;
}

const radialNodes = 48;
const angularNodes = 96;
const subSamples = 8;

export function interferenceVisibility(structure: MomentumStructureFactor, options: VisibilityOptions): InterferenceVisibility {
  const a = options.latticeSpacingUm;
  if (!(a > 0) || !Number.isFinite(a)) {
    throw new Error(`interferenceVisibility: lattice spacing must be a positive number of micrometres, got ${a}`);
  }
  const radius = options.diskRadiusInTwoHbarKl ?? 0.15;
  if (!(radius > 0 && radius < Math.SQRT1_2 / 2)) {
    // Beyond 0.354 the disks at (1, 0) and (0.707, 0.707) would overlap.
    throw new Error(`interferenceVisibility: disk radius must lie in (0, 0.35) units of 2 hbar k_L, got ${radius}`);
  }
  const m = structure.samplesPerZone;
  const g = (2 * Math.PI) / a; // first reciprocal lattice vector, 1/um
  const dk = g / m;
  const env = options.envelope;
  const power = structure.coherentPower;
  const cellWeight = 1 / (m * a * (m * a)); // dk^2 / (2 pi)^2

  const rK = radius * g; // disk radius in 1/um
  const rIdx = radius * m; // in grid steps

  const diskAtoms = (angle: number): number => {
    const cx = Math.cos(angle) * g;
    const cy = Math.sin(angle) * g;
    // Incoherent part: polar midpoint rule rotated with the disk.
    let envIntegral = 0;
    const dr = rK / radialNodes;
    const dTheta = (2 * Math.PI) / angularNodes;
    for (let i = 0; i < radialNodes; i++) {
      const rho = (i + 0.5) * dr;
      for (let j = 0; j < angularNodes; j++) {
        const theta = angle + (j + 0.5) * dTheta;
        envIntegral += env.at(cx + rho * Math.cos(theta), cy + rho * Math.sin(theta)) * rho;
      }
    }
    envIntegral *= (dr * dTheta) / (4 * Math.PI * Math.PI);
    // Coherent part: grid points, edge cells by sub-sampling.
    let coherent = 0;
    const ux = cx / dk;
    const uy = cy / dk;
    const pLo = Math.floor(ux - rIdx - 1);
    const pHi = Math.ceil(ux + rIdx + 1);
    const qLo = Math.floor(uy - rIdx - 1);
    const qHi = Math.ceil(uy + rIdx + 1);
    for (let p = pLo; p <= pHi; p++) {
      const pz = ((p % m) + m) % m;
      for (let q = qLo; q <= qHi; q++) {
        const d = Math.hypot(p - ux, q - uy);
        let w: number;
        if (d <= rIdx - 0.75) w = 1; // whole cell inside (half-diagonal 0.707)
        else if (d >= rIdx + 0.75) continue;
        else {
          let inside = 0;
          for (let s = 0; s < subSamples; s++) {
            const sx = p - 0.5 + (s + 0.5) / subSamples - ux;
            for (let t = 0; t < subSamples; t++) {
              const sy = q - 0.5 + (t + 0.5) / subSamples - uy;
              if (sx * sx + sy * sy <= rIdx * rIdx) inside++;
            }
          }
          w = inside / (subSamples * subSamples);
          if (w === 0) continue;
        }
        const qz = ((q % m) + m) % m;
        coherent += w * env.at(p * dk, q * dk) * power[pz * m + qz];
      }
    }
    return coherent * cellWeight + structure.incoherentAtoms * envIntegral;
  };

  return fourDiskVisibility(diskAtoms, radius);
}

export interface PictureVisibilityOptions {
  /** Distance of the first-order peaks from the zero-momentum peak, h t / (m a), um. */
  firstOrderPeakUm: number;
  /** Disk radius in units of the peak distance (2 hbar k_L); default 0.15. */
  diskRadiusInTwoHbarKl?: number;
}

export interface PictureVisibility extends InterferenceVisibility {
  /** Disks that reach beyond the picture (their atoms are then undercounted). */
  disksOutsidePicture: number;
}

/**
 * The same visibility measured on a picture in real space (a finite-time free expansion, or
 * any camera picture): atoms in the disks of radius r x_1 around (+-x_1, 0), (0, +-x_1) and
 * around the four diagonal points at the same distance, pixels weighted by the fraction of
 * their area inside the disk (8 x 8 sub-samples at the rim). Far from the far field the disks
 * keep their far-field places, as in an experiment's analysis. The picture's coordinates are
 * measured from the zero-momentum peak.
 */
export function pictureVisibility(picture: PixelPicture, options: PictureVisibilityOptions): PictureVisibility {
  const x1 = options.firstOrderPeakUm;
  if (!(x1 > 0) || !Number.isFinite(x1)) {
    throw new Error(`pictureVisibility: firstOrderPeakUm must be a positive number of um, got ${x1}`);
  }
  const radius = options.diskRadiusInTwoHbarKl ?? 0.15;
  if (!(radius > 0 && radius < Math.SQRT1_2 / 2)) {
    throw new Error(`pictureVisibility: disk radius must lie in (0, 0.35) units of 2 hbar k_L, got ${radius}`);
  }
  const { values, nx, ny, pixelUm: p, xCentresUm: xs, yCentresUm: ys } = picture;
  const r = radius * x1;
  const halfDiagonal = p * Math.SQRT1_2;
  let outside = 0;
  const diskAtoms = (angle: number): number => {
    const cx = Math.cos(angle) * x1;
    const cy = Math.sin(angle) * x1;
    if (cx - r < xs[0] - p / 2 || cx + r > xs[nx - 1] + p / 2 || cy - r < ys[0] - p / 2 || cy + r > ys[ny - 1] + p / 2) outside++;
    let sum = 0;
    const iLo = Math.max(0, Math.floor((cx - r - xs[0]) / p) - 1);
    const iHi = Math.min(nx - 1, Math.ceil((cx + r - xs[0]) / p) + 1);
    const jLo = Math.max(0, Math.floor((cy - r - ys[0]) / p) - 1);
    const jHi = Math.min(ny - 1, Math.ceil((cy + r - ys[0]) / p) + 1);
    for (let i = iLo; i <= iHi; i++) {
      const dx = xs[i] - cx;
      for (let j = jLo; j <= jHi; j++) {
        const dy = ys[j] - cy;
        const d = Math.hypot(dx, dy);
        let w: number;
        if (d <= r - halfDiagonal) w = 1;
        else if (d >= r + halfDiagonal) continue;
        else {
          let inside = 0;
          for (let a = 0; a < subSamples; a++) {
            const sx = dx + ((a + 0.5) / subSamples - 0.5) * p;
            for (let b = 0; b < subSamples; b++) {
              const sy = dy + ((b + 0.5) / subSamples - 0.5) * p;
              if (sx * sx + sy * sy <= r * r) inside++;
            }
          }
          w = inside / (subSamples * subSamples);
        }
        sum += w * values[i * ny + j];
      }
    }
    return sum;
  };
  // the disks are counted first, so `outside` is complete when it is read
  return { ...fourDiskVisibility(diskAtoms, radius), disksOutsidePicture: outside };
}

/**
 * V = (peak - diagonal) / (peak + diagonal) from the atoms in the four disks at the
 * first-order peaks (angles 0, 90, 180, 270 degrees) and the four diagonal disks (45 + k 90);
 * shared by the momentum-space and the picture measurement so that both count the disks in
 * the same order and round alike.
 */
function fourDiskVisibility(diskAtoms: (angle: number) => number, radius: number): InterferenceVisibility {
  let peakAtoms = 0;
  let diagonalAtoms = 0;
  for (let k = 0; k < 4; k++) {
    peakAtoms += diskAtoms((k * Math.PI) / 2);
    diagonalAtoms += diskAtoms(Math.PI / 4 + (k * Math.PI) / 2);
  }
  const total = peakAtoms + diagonalAtoms;
  return {
    visibility: total > 0 ? (peakAtoms - diagonalAtoms) / total : 0,
    peakAtoms,
    diagonalAtoms,
    diskRadiusInTwoHbarKl: radius,
  };
}
