// Fluctuation thermometry of a stack of shots beside the fitted temperature: the
// fluctuation-dissipation theorem of the grand canonical ensemble, <dN^2> = kT (d<N>/dmu)_T,
// for the atoms N_b of each radial bin of the trap, a subsystem open to the rest of the cloud
// at mu_local = mu0 - V (Q. Zhou and T.-L. Ho, Phys. Rev. Lett. 106, 225301 (2011); applied
// in src/imaging/camera/fluctuationThermometry.ts, which holds the estimator and its errors).
// Here: the shots of the compare fit, each with its own border background subtracted (a
// shifting offset would add P_b^2 var(offset) to every bin), the imaging-noise variance per
// pixel subtracted from the shot-to-shot variance, and the noise of that border median too:
// the median of n border pixels of noise variance s^2 scatters by var = pi s^2 / (2 n) (the
// large-n variance of a sample median, 1 / (4 n f(m)^2), for Gaussian noise; common
// statistics), which adds P_b^2 var to a bin of P_b pixels and would read wide outer bins hot; bins in the trap-scaled radius about the
// fitted centre (sites), and the potential V = f^2 k_ref r^2 of the scenario's trap with the
// fitted frequency factor f. The result is in the scenario's energy unit.

import { fluctuationThermometry, type FluctuationThermometry } from '../imaging/camera/fluctuationThermometry.js';
import type { CameraWarning } from '../imaging/camera/pixelImage.js';
import { planarMaskToCamera, planarToCamera } from '../imaging/cameraConvention.js';
import { borderBackground, borderPixels } from './compareFitNoise.js';
import type { CompareFit } from './compareFit.js';

export interface ThermometryInput {
  /** The shots, grid layout, atoms per pixel (as given to the fit). */
  shots: readonly Float64Array[];
  /** Mean imaging-noise variance per pixel of one shot, atoms^2, grid layout. */
  imagingVariance: Float64Array;
  /**
   * Bin width in trap-scaled sites; default the larger of 1 site and 3 PSF sigmas: wider than
   * the blur (atoms blurred across a bin edge hide fluctuations) but narrow enough that the
   * trap potential changes little across a bin (the slope is taken at the bin's mean
   * potential: in the test of 80 atomic-limit shots, 2-site bins left the outermost usable
   * bin at half the temperature, and 1-site bins cut the combined uncertainty from 12 % to 7 %).
   */
  binSites?: number;
}

export interface ThermometryResult {
  available: true;
  binSites: number;
  /** kT from the fluctuations, scenario energy unit, and its standard uncertainty. */
  kT: number;
  kTUncertainty: number;
  /** The fitted kT (scenario unit) beside it. */
  fittedKT: number;
  bins: Array<{ radiusSites: number; pixels: number; potential: number; meanAtoms: number; varianceAtoms: number; imagingVarianceAtoms: number; atomsPerEnergy: number; kT: number; kTUncertainty: number; usable: boolean }>;
  usableBins: number;
  chiSquare: number;
  degreesOfFreedom: number;
  shotCount: number;
  energyUnit: string;
  warnings: CameraWarning[];
  method: string;
}

export type ThermometryReading = ThermometryResult | { available: false; reason: string };

export function stackThermometry(c: CompareFit, input: ThermometryInput): ThermometryReading {
  const M = input.shots.length;
  if (M < 3) return { available: false, reason: `fluctuation thermometry needs a stack of at least 3 shots (tens for a useful error bar); ${M} given` };
  const { resolved } = c.prepared;
  const optics = c.optics;
  const k = resolved.trapCoefficient.map((v) => v * c.best.trapFactor * c.best.trapFactor);
  const kept = optics.keptAxes;
  const kRef = k[kept[0]] ?? 0;
  if (!(kRef > 0) || !((k[kept[1]] ?? 0) > 0)) return { available: false, reason: 'the scenario has no harmonic trap in the image plane, so a radius gives no local chemical potential' };
  const { nx, ny, mask } = c.measured;
  const pixelSites = c.measured.pixelUm / optics.cellUm;
  const binSites = input.binSites ?? Math.max(1, (3 * c.picture.psfSigmaUm) / optics.cellUm);
  const borderVariances = borderPixels({ values: input.imagingVariance, nx, ny }, mask);
  const offsetVariance = borderVariances.length > 0 ? (Math.PI / 2) * (borderVariances.reduce((a, v) => a + v, 0) / borderVariances.length) / borderVariances.length : 0;
  const shots = input.shots.map((shot) => {
    const b = borderBackground({ values: shot, nx, ny }, mask).background;
    return planarToCamera({ values: Float64Array.from(shot, (v) => v - b), nx, ny });
  });
  const warnings: CameraWarning[] = [];
  const anisotropic = Math.abs((k[kept[1]] as number) / kRef - 1) > 1e-9;
  if (anisotropic && Math.abs(c.picture.angleRad) > Math.PI / 180) {
    warnings.push({ code: 'bins-not-turned', message: 'the fitted turn of the lattice is above 1 degree in an anisotropic trap; the thermometry bins are ellipses along the image axes, not the trap axes' });
  }
  let result: FluctuationThermometry;
  try {
    result = fluctuationThermometry({
      shots,
      mask: planarMaskToCamera(mask, nx, ny),
      centreX: c.picture.centreX,
      centreY: ny - 1 - c.picture.centreY,
      scaleX: pixelSites * Math.sqrt((k[kept[0]] as number) / kRef),
      scaleY: pixelSites * Math.sqrt((k[kept[1]] as number) / kRef),
      binWidth: binSites,
      harmonicHzPerUm2: kRef,
      imagingVariance: planarToCamera({ values: input.imagingVariance, nx, ny }).values,
      offsetVariance,
    });
  } catch (err) {
    return { available: false, reason: (err as Error).message };
  }
  const ips = c.internalPerScenarioUnit;
  warnings.push(...result.warnings);
  return {
    available: true,
    binSites,
    kT: result.kTHz / ips,
    kTUncertainty: result.kTHzUncertainty / ips,
    fittedKT: c.best.kTInternal / ips,
    bins: result.bins.map((b) => ({
      radiusSites: b.radius,
      pixels: b.pixelCount,
      potential: b.potentialHz / ips,
      meanAtoms: b.meanAtoms,
      varianceAtoms: b.varianceAtoms,
      imagingVarianceAtoms: b.imagingVarianceAtoms,
      atomsPerEnergy: b.atomsPerHz * ips,
      kT: b.kTHz / ips,
      kTUncertainty: b.kTHzUncertainty / ips,
      usable: b.usable,
    })),
    usableBins: result.usableBins,
    chiSquare: result.chiSquare,
    degreesOfFreedom: result.degreesOfFreedom,
    shotCount: M,
    energyUnit: c.energyUnit,
    warnings,
    method:
      'kT = sum_b (<dN_b^2> - imaging noise_b) / sum_b d<N_b>/dmu over radial bins, d<N_b>/dmu from the mean profile in the local density approximation: ' +
      'the fluctuation-dissipation theorem <dN^2> = kT d<N>/dmu (Zhou & Ho, Phys. Rev. Lett. 106, 225301 (2011)); imaging noise and the scatter of each shot\'s border median ' +
      '(pi s^2 / 2n per pixel, for n border pixels of noise variance s^2) subtracted from the variance',
  };
}
