// The camera pictures of a solve run: the cloud handed to the camera model
// (src/imaging/cameraOptics.ts: CloudForImaging) and the picture set of the scenario's
// camera and time-of-flight sections (src/imaging/cameraPictures.ts).
//
// Laboratory mode supplies the mass, the lattice and trapped axes from which the site
// orbitals are built (band-structure Wannier functions, harmonic-oscillator ground states;
// imaging/siteOrbital.ts) and the model arrays of the optional strong-coupling correction;
// also, per lattice axis, the Gaussian width
// l = sqrt(2) x (rms spread of the numerical Wannier function): |w(x)|^2 of the Gaussian
// w = (pi l^2)^(-1/4) exp(-x^2 / 2 l^2) has standard deviation l / sqrt(2), so matching
// the spread matches the envelope's width in k.

import type { CloudForImaging } from '../imaging/cameraOptics.js';
import { cameraPictures, type CameraPictureSet } from '../imaging/cameraPictures.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import type { SiteFields } from '../observables/siteFields.js';
import type { SiteClassification } from '../observables/siteClassification.js';

/** The cloud of `resolved` with per-site fields `fields` (density, parity, order parameter). */
export function cloudOf(
  resolved: ResolvedScenario,
  fields: Pick<SiteFields, 'density' | 'parityOdd' | 'orderParameter'>,
  classification?: Pick<SiteClassification, 'mottFilling'>,
): CloudForImaging {
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
    orbitalAxes: lab === null ? null : { latticeAxes: lab.hubbard.latticeAxes, harmonicAxes: lab.hubbard.harmonicAxes },
    strongCoupling:
      classification === undefined
        ? null
        : {
            mottFilling: classification.mottFilling,
            hopping: resolved.model.hopping,
            interactionU: resolved.model.interactionU,
            sitePotential: resolved.model.eps,
            periodic: resolved.geometry.periodic,
          },
  };
}

/** The imaging input of a finished solve. */
export function cloudForImaging(a: { resolved: ResolvedScenario; fields: SiteFields; classification?: SiteClassification }): CloudForImaging {
  return cloudOf(a.resolved, a.fields, a.classification);
}

/** Every camera picture of a finished solve, with the scenario's camera settings. */
export function solvePictures(a: { resolved: ResolvedScenario; fields: SiteFields; classification?: SiteClassification }): CameraPictureSet {
  const scenario = a.resolved.scenario;
  return cameraPictures(cloudForImaging(a), scenario.camera, scenario.timeOfFlight);
}
