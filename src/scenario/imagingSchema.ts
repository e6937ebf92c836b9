// Scenario sections for the pictures a camera would record (DESIGN.md section 4):
// `camera` (in-situ and parity-projected images through the imaging optics) and
// `timeOfFlight` (the picture after free expansion, exact at the flight time or in the
// far-field approximation; optional strong-coupling correction). Both are optional in a
// scenario; when absent, cameraOutputs.ts uses the defaults documented below.
//
// Lengths: a key ending in Um is in micrometres and exists only in laboratory mode; a key
// ending in Sites is in lattice spacings and works in both modes (in laboratory mode it is
// multiplied by the lattice spacing). A dimensionless scenario (no lattice spacing known)
// that gives a ...Um key is refused with the name of its ...Sites twin (scenarioSchema.ts),
// so no key ending in Um is ever read as lattice spacings.
//
// PSF width from the optics: sigma = 0.21 lambda / NA, the Gaussian approximation of the
// Airy core (Zhang, Zerubia, Olivo-Marin, Appl. Opt. 46, 1819 (2007)).

import * as z from 'zod';

const positive = (): z.ZodNumber => z.number().positive();

export const PointSpreadFromOpticsSchema = z
  .strictObject({
    wavelengthNm: positive().max(100_000).describe('imaging light wavelength in nm (laboratory mode only)'),
    numericalAperture: positive().max(1.6).describe('numerical aperture of the objective (above 1 only for immersion optics)'),
  })
  .describe('Gaussian PSF with sigma = 0.21 wavelength / NA in the object plane');

export const PointSpreadSigmaUmSchema = z
  .strictObject({
    sigmaUm: z.number().min(0).describe('Gaussian PSF standard deviation in the object plane, µm (laboratory mode; use sigmaSites in dimensionless mode); 0 for none'),
  })
  .describe('Gaussian PSF of a given width in micrometres');

export const PointSpreadSigmaSitesSchema = z
  .strictObject({
    sigmaSites: z.number().min(0).describe('Gaussian PSF standard deviation in the object plane, in lattice spacings; 0 for none'),
  })
  .describe('Gaussian PSF of a given width in lattice spacings');

export const PointSpreadSchema = z.union([PointSpreadFromOpticsSchema, PointSpreadSigmaUmSchema, PointSpreadSigmaSitesSchema]);

export const CameraNoiseSchema = z
  .strictObject({
    kind: z
      .enum(['none', 'atom', 'photon'])
      .default('none')
      .describe("'none': expected image only; 'atom': Poisson atom number per pixel; 'photon': Poisson detected counts per pixel"),
    countsPerAtom: positive()
      .max(1e6)
      .optional()
      .describe("detected counts (photons) per atom for kind 'photon' (default 10); kind 'atom' always uses 1"),
    seed: z.string().min(1).max(200).default('camera-noise').describe('name of the random stream; the same seed gives the same noisy picture'),
  })
  .describe('shot noise of a single simulated exposure');

export const CameraSchema = z
  .strictObject({
    imagingAxis: z
      .enum(['x', 'y', 'z'])
      .default('z')
      .describe("lattice axis along which the camera looks (3D: the column is summed along it); 'z' images a 2D layer face on"),
    magnification: positive().max(10_000).default(1).describe('magnification of the imaging system (image size / object size)'),
    cameraPixelUm: positive()
      .max(10_000)
      .optional()
      .describe('camera pixel size on the sensor, µm (laboratory mode); default: magnification x half a lattice spacing (object-plane pixel a/2)'),
    cameraPixelSites: positive()
      .max(10_000)
      .optional()
      .describe('or: camera pixel size on the sensor in lattice spacings (the object-plane pixel is cameraPixelSites / magnification sites); the key for dimensionless mode'),
    psf: PointSpreadSchema.optional().describe(
      'point-spread function: {wavelengthNm, numericalAperture}, {sigmaUm} or {sigmaSites}; default sigma = 0.5 lattice spacing',
    ),
    noise: CameraNoiseSchema.prefault({}),
    framePixels: z
      .array(z.int().min(1).max(8192))
      .length(2)
      .optional()
      .describe('size of the picture in camera pixels [along image x, along image y], centred on the trap centre; default: the whole cloud plus a margin'),
  })
  .describe('in-situ camera: imaging axis, magnification, pixel size, point-spread function and shot noise');

export const TimeOfFlightSchema = z
  .strictObject({
    flightTimeMs: positive().max(10_000).default(20).describe('free expansion time after the lattice and trap are switched off, ms'),
    model: z
      .enum(['free-expansion', 'far-field'])
      .default('free-expansion')
      .describe(
        "'free-expansion': the density after the flight, exact for a free expansion (interactions neglected during the flight); " +
          "'far-field': the momentum distribution at k = m x / (hbar t), an approximation below the far-field time m R^2 / hbar",
      ),
    strongCouplingCorrection: z
      .boolean()
      .default(false)
      .describe('add the first-order particle-hole coherence 2 n (n + 1) J / U of Mott bonds, which mean field leaves out (raises the visibility of Mott regions)'),
    cameraPixelUm: positive()
      .max(10_000)
      .optional()
      .describe('camera pixel size on the sensor, µm; default: the momentum grid itself (about 64 pixels per Brillouin zone); the picture needs laboratory mode'),
    magnification: positive().max(10_000).default(1).describe('magnification of the time-of-flight imaging system'),
    brillouinZones: z.int().min(1).max(15).default(3).describe('Brillouin zones shown per axis (odd); 3 shows the first-order peaks'),
    visibilityDiskRadiusInTwoHbarKl: positive()
      .max(0.35)
      .default(0.15)
      .describe('radius of the disks counted for the visibility, in units of 2 hbar k_L (the first-order peak distance)'),
  })
  .superRefine((t, ctx) => {
    if (t.brillouinZones % 2 !== 1) {
      ctx.addIssue({ code: 'custom', path: ['brillouinZones'], message: `expected an odd number so that k = 0 sits in the middle, got ${t.brillouinZones}` });
    }
  })
  .describe('time-of-flight picture: expansion time, camera pixel and magnification, and the visibility measurement');

/**
 * Problems of the camera and time-of-flight sections that depend on the mode: in
 * dimensionless mode a key ending in Um would hold lattice spacings, so it is refused with
 * the key to use instead. Paths are relative to the scenario root.
 */
export function imagingModeIssues(camera: CameraSettings | undefined, tof: TimeOfFlightSettings | undefined, laboratory: boolean): Array<[PropertyKey[], string]> {
  const out: Array<[PropertyKey[], string]> = [];
  if (camera?.cameraPixelUm !== undefined && camera.cameraPixelSites !== undefined) {
    out.push([['camera', 'cameraPixelUm'], 'give one of cameraPixelUm and cameraPixelSites']);
  }
  if (laboratory) return out;
  const why = 'a dimensionless scenario has no lattice spacing in micrometres';
  if (camera?.cameraPixelUm !== undefined) out.push([['camera', 'cameraPixelUm'], `give camera.cameraPixelSites (in lattice spacings) instead: ${why}`]);
  if (camera?.psf !== undefined && 'sigmaUm' in camera.psf) out.push([['camera', 'psf', 'sigmaUm'], `give camera.psf.sigmaSites (in lattice spacings) instead: ${why}`]);
  if (tof?.cameraPixelUm !== undefined) {
    out.push([['timeOfFlight', 'cameraPixelUm'], 'remove it: there is no time-of-flight picture in dimensionless mode (it needs the atomic mass and the lattice spacing)']);
  }
  return out;
}

export type CameraSettings = z.output<typeof CameraSchema>;
export type CameraSettingsInput = z.input<typeof CameraSchema>;
export type TimeOfFlightSettings = z.output<typeof TimeOfFlightSchema>;
export type TimeOfFlightSettingsInput = z.input<typeof TimeOfFlightSchema>;

/** Defaults used when a scenario has no `camera` section (see the key descriptions). */
export const defaultCameraSettings = (): CameraSettings => CameraSchema.parse({});
/** Defaults used when a scenario has no `timeOfFlight` section. */
export const defaultTimeOfFlightSettings = (): TimeOfFlightSettings => TimeOfFlightSchema.parse({});
