// The camera pictures of a solve run: the cloud handed to the camera model
// (src/imaging/cameraOptics.ts: CloudForImaging) and the picture set of the scenario's
// camera and time-of-flight sections (src/imaging/cameraPictures.ts).
//
// Laboratory mode supplies the mass and, per lattice axis, the Gaussian width
// l = sqrt(2) x (rms spread of the numerical Wannier function): |w(x)|^2 of the Gaussian
// w = (pi l^2)^(-1/4) exp(-x^2 / 2 l^2) has standard deviation l / sqrt(2), so matching
// the spread matches the envelope's width in k.

import type { CloudForImaging } from '../imaging/cameraOptics.js';
import { cameraPictures, type CameraPictureSet } from '../imaging/cameraPictures.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import type { SiteFields } from '../observables/siteFields.js';

/** The cloud of `resolved` with per-site fields `fields` (density, parity, order parameter). */
export function cloudOf(resolved: ResolvedScenario, fields: Pick<SiteFields, 'density' | 'parityOdd' | 'orderParameter'>): CloudForImaging {
  const lab = resolved.laboratory;
  const dims = resolved.geometry.shape.length;
  let massKg: number | null = null;
  let wannierWidthSites: number[] | null = null;
  if (lab !== null) {
    massKg = lab.massKg;
    const spacingNm = lab.latticeSpacingUm * 1000;
    const widths = lab.hubbard.latticeAxes.slice(0, dims).map((axis) => (Math.SQRT2 * axis.wannierWidthNm) / spacingNm);
    wannierWidthSites = widths.length === dims && widths.every((w) => w > 0 && Number.isFinite(w)) ? widths : null;
  }
  return {
    name: resolved.scenario.name,
    shape: resolved.geometry.shape,
    latticeSpacingUm: resolved.latticeSpacingUm,
    massKg,
    density: fields.density,
    parityOdd: fields.parityOdd,
    orderParameter: fields.orderParameter,
    trapCentre: resolved.trapCentre,
    wannierWidthSites,
  };
}

/** The imaging input of a finished solve. */
export function cloudForImaging(a: { resolved: ResolvedScenario; fields: SiteFields }): CloudForImaging {
  return cloudOf(a.resolved, a.fields);
}

/** Every camera picture of a finished solve, with the scenario's camera settings. */
export function solvePictures(a: { resolved: ResolvedScenario; fields: SiteFields }): CameraPictureSet {
  const scenario = a.resolved.scenario;
  return cameraPictures(cloudForImaging(a), scenario.camera, scenario.timeOfFlight);
}
