// The `chi-square-far-from-one` warning of the compare fit. Its uncertainties come from the
// noise model (compareFitNoise.ts): they hold only if the picture scatters about the model
// as that model says. The reduced chi-square tests exactly that: for a right model and right
// noise it follows chi^2_nu / nu with mean 1 and standard deviation sqrt(2 / nu) (the
// chi-square distribution with nu degrees of freedom has mean nu and variance 2 nu;
// Bevington & Robinson, 3rd ed., section 11.1). A value many standard deviations away means
// the noise model (or the model) is wrong and the quoted errors with it, by a factor of about
// sqrt(chi^2_nu). Above 1 the reported uncertainty is already enlarged by sqrt(chi^2_nu)
// (compareFit.ts, PDG scale factor); below 1 it is not shrunk, so it is too large. Either
// way the errors scaled by sqrt(chi^2_nu) are quoted beside them
// (`uncertaintyScaledByReducedChiSquare`, common practice in least squares: it takes the
// scatter of the residuals as the noise, which is right only if the model is).

import type { CameraWarning } from '../imaging/camera/pixelImage.js';

/**
 * Standard deviations of the chi-square distribution beyond which chi^2_nu counts as far
 * from 1. Five keeps a right fit quiet (the chance that a right fit warns, the upper tail
 * of the chi-square distribution beyond 1 + 5 sqrt(2/nu): 3.5e-4 at nu = 10, 1.4e-5 at
 * nu = 100, 1.4e-6 at nu = 1000, scipy.stats.chi2.sf), while a noise model off by 20 % in
 * variance (chi^2_nu = 1.2 or 0.8) is caught from nu = 1250 on (5 sqrt(2/nu) < 0.2).
 */
export const CHI_SQUARE_WARNING_SIGMAS = 5;

/** Standard deviation of chi^2_nu for a right model and right noise: sqrt(2 / nu). */
export function reducedChiSquareSpread(degreesOfFreedom: number): number {
  return Math.sqrt(2 / degreesOfFreedom);
}

/** Whether chi^2_nu lies more than CHI_SQUARE_WARNING_SIGMAS standard deviations from 1. */
export function chiSquareFarFromOne(reducedChiSquare: number, degreesOfFreedom: number): boolean {
  if (!(degreesOfFreedom >= 1) || !Number.isFinite(reducedChiSquare)) return false;
  return Math.abs(reducedChiSquare - 1) > CHI_SQUARE_WARNING_SIGMAS * reducedChiSquareSpread(degreesOfFreedom);
}

const shown = (x: number): string => String(Number(x.toPrecision(3)));

/** The warning when chi^2_nu is far from 1 (none otherwise). */
export function chiSquareWarnings(reducedChiSquare: number, degreesOfFreedom: number): CameraWarning[] {
  if (!chiSquareFarFromOne(reducedChiSquare, degreesOfFreedom)) return [];
  const head =
    `the reduced chi-square is ${shown(reducedChiSquare)} on ${degreesOfFreedom} degrees of freedom, ` +
    `${CHI_SQUARE_WARNING_SIGMAS} or more standard deviations from 1 (a fit within the noise model gives 1 +- ${shown(reducedChiSquareSpread(degreesOfFreedom))}): `;
  const factor = shown(Math.sqrt(reducedChiSquare));
  const message =
    reducedChiSquare < 1
      ? head +
        'the picture scatters less than the noise model assumes (a noise-free or smoothed picture, or counts per atom set too low), ' +
        `so the quoted uncertainties are too large by about 1/sqrt(chi2_nu) = ${shown(1 / Math.sqrt(reducedChiSquare))}; ` +
        `uncertaintyScaledByReducedChiSquare (x ${factor}) takes the scatter of the residuals as the noise (common practice in least squares, right only if the model is)`
      : head +
        'the picture scatters more than the noise model assumes, or the model does not describe it (look at the residual picture); ' +
        `the quoted uncertainties are enlarged by sqrt(chi2_nu) = ${factor}, which is right only if the model is right`;
  return [{ code: 'chi-square-far-from-one', message }];
}
