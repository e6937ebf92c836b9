// Speckle grain sizes from the imaging optics that project the speckle.
//
// Fully developed speckle in the focal region of a lens whose pupil is uniformly
// filled by light from a diffuser is a circular complex Gaussian field. Its intensity
// autocorrelation in a plane transverse to the beam is (Goodman, Speckle Phenomena in
// Optics, Roberts & Co., 2007, the circular-pupil case of the autocorrelation chapter):
//
//     <I(r) I(r + d)> / <I>^2 = 1 + |2 J1(v) / v|^2,   v = 2 pi NA |d| / lambda.
//
// Grain size used throughout tiercake ("grainSites"): the radius r0 of the FIRST ZERO
// of that autocorrelation, r0 = j_{1,1} lambda / (2 pi NA) = 0.6098 lambda / NA, with
// j_{1,1} = 3.8317 the first zero of J1 (Abramowitz & Stegun, Table 9.5). We chose the
// first zero because it is exact, independent of any fitting convention and the same
// number as the Airy-disc radius of the projecting lens. For comparison, the 1/e^2
// radius of |2 J1(v)/v|^2 is at v = 2.58, i.e. 0.67 r0, and its half width at half
// maximum at v = 1.62, i.e. 0.42 r0: convert before passing published grain sizes
// defined those ways.
//
// Along the beam, Fresnel propagation of the uniformly filled pupil gives (paraxial
// optics; the derivation is in speckle.ts) the axial intensity correlation
//
//     |mu(dz)|^2 = sinc^2(pi NA^2 dz / (2 lambda)),   sinc(x) = sin(x)/x,
//
// whose first zero z0 = 2 lambda / NA^2 we call the longitudinal grain size. Goodman
// (2007) states the same axial speckle size as about 8 lambda (z/D)^2 for a pupil of
// diameter D at distance z, which is 2 lambda/NA^2 with NA = D/(2z) (recalled from
// memory; the derivation here does not depend on it). It is paraxial: it holds for
// NA up to about 0.5.

/** First positive zero j_{1,1} of the Bessel function J1 (Abramowitz & Stegun, Table 9.5). */
export const BESSEL_J1_FIRST_ZERO = 3.8317059702075125;

function checkOptics(wavelengthNm: number, numericalAperture: number, latticeSpacingNm: number): void {
  if (!Number.isFinite(wavelengthNm) || wavelengthNm <= 0) {
    throw new RangeError(`speckle wavelengthNm: expected a wavelength > 0 in nm, got ${wavelengthNm}`);
  }
  if (!Number.isFinite(numericalAperture) || numericalAperture <= 0 || numericalAperture >= 1) {
    throw new RangeError(
      `speckle numericalAperture: expected 0 < NA < 1 (vacuum imaging), got ${numericalAperture}`,
    );
  }
  if (!Number.isFinite(latticeSpacingNm) || latticeSpacingNm <= 0) {
    throw new RangeError(
      `speckle latticeSpacingNm: expected a lattice spacing > 0 in nm, got ${latticeSpacingNm}`,
    );
  }
}

/**
 * Transverse grain size in lattice sites: the first zero r0 = 0.61 lambda/NA of the
 * intensity autocorrelation |2 J1(v)/v|^2 (Goodman 2007), divided by the lattice spacing.
 */
export function grainSitesFromAperture(
  wavelengthNm: number,
  numericalAperture: number,
  latticeSpacingNm: number,
): number {
  checkOptics(wavelengthNm, numericalAperture, latticeSpacingNm);
  return (BESSEL_J1_FIRST_ZERO / (2 * Math.PI)) * (wavelengthNm / numericalAperture) / latticeSpacingNm;
}

/**
 * Longitudinal grain size in lattice sites: the first zero z0 = 2 lambda/NA^2 of the
 * axial intensity autocorrelation sinc^2(pi NA^2 dz / (2 lambda)) (paraxial).
 */
export function longitudinalGrainSitesFromAperture(
  wavelengthNm: number,
  numericalAperture: number,
  latticeSpacingNm: number,
): number {
  checkOptics(wavelengthNm, numericalAperture, latticeSpacingNm);
  return (2 * wavelengthNm) / (numericalAperture * numericalAperture) / latticeSpacingNm;
}
