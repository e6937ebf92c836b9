// Scenario key `landscape` (issue 16): a list of potential terms added to the trap, each with
// a `kind`: sites (a per-site energy file), image (a potential picture placed on the lattice),
// gradient (a linear tilt), box (a flat-bottomed disc, ring or rectangle) and superlattice
// (a second standing wave, optionally changing J and U in laboratory mode).
//
// Units that cannot be misread: every energy of a term is in the scenario's energyUnit unless
// the term's `unit` says otherwise; lengths are in `lengthUnit` ("sites": lattice spacings,
// "um": micrometres, laboratory mode only). In laboratory mode a term with lengths must say
// which (no default), so a radius of 10 is never taken for sites when µm were meant.
// Positions (`offset`) are measured from the lattice centre, (n - 1) / 2 per axis.

import * as z from 'zod';
import { EnergyUnitSchema } from './scenarioEnergyUnit.js';

const positive = (): z.ZodNumber => z.number().positive();
const lengthUnit = z.enum(['sites', 'um']);
const termName = z
  .string()
  .regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$/, 'letters, digits, ".", "_" and "-" only, at most 40 characters')
  .optional()
  .describe('label of the term in the report and summary (default: kind and position in the list, e.g. "box-1")');
const unitKey = EnergyUnitSchema.optional().describe("energy unit of this term's energies and file values (default: the scenario's energyUnit)");
const lengthUnitKey = lengthUnit
  .optional()
  .describe('"sites" (lattice spacings) or "um" (micrometres, laboratory mode); required in laboratory mode, "sites" in hubbard mode');
const filePath = z.string().min(1).max(4096).describe('file path, relative to the scenario file (or absolute)');

/** A landscape term: its `kind` and optional `name` first (the same in every term), then its own fields. */
function landscapeTerm<K extends string, F extends z.ZodRawShape>(kind: K, kindText: string, fields: F, description: string) {
  return z.strictObject({ kind: z.literal(kind).describe(kindText), name: termName, ...fields }).describe(description);
}

export const SitesTermSchema = landscapeTerm(
  'sites',
  "'sites': per-site energies from an .npy file",
  {
    file: filePath.describe('.npy of per-site energies with the lattice shape (C order, axes x, y, z as in lattice.shape); path relative to the scenario file'),
    unit: unitKey,
  },
  'per-site energies computed elsewhere',
);

export const ImageTermSchema = landscapeTerm(
  'image',
  "'image': a potential picture (DMD or SLM pattern) placed on the lattice",
  {
    file: filePath.describe(
      'picture: 2D .npy a[row, col] or greyscale PNG (8 or 16 bit); column = lattice x, row = lattice y, row 0 at the top; path relative to the scenario file',
    ),
    energyPerLevel: z.number().optional().describe('energy per grey level (PNG, required) or per unit of the stored value (.npy, default 1), in unit'),
    unit: unitKey,
    pixelSize: positive().describe('side of one picture pixel at the atoms, in lengthUnit'),
    lengthUnit: lengthUnitKey,
    offset: z.array(z.number()).length(2).default([0, 0]).describe('position (x, y) of the picture centre from the lattice centre, in lengthUnit'),
    angleDeg: z.number().default(0).describe('rotation of the picture about its centre, degrees from the lattice x axis towards y'),
    resampling: z
      .enum(['auto', 'bilinear', 'area'])
      .default('auto')
      .describe('"bilinear" at site centres, "area" mean over each site cell, "auto": area when a pixel is smaller than a site'),
  },
  'potential picture',
);

export const GradientTermSchema = landscapeTerm(
  'gradient',
  "'gradient': a linear tilt (gravity along a tilted lattice, a magnetic gradient)",
  {
    direction: z.array(z.number()).min(1).max(3).describe('direction in which the energy rises, one component per lattice axis (normalised)'),
    perSite: z.number().optional().describe('slope: energy per lattice spacing along direction, in unit'),
    perUm: z.number().optional().describe('or slope: energy per micrometre along direction, in unit (laboratory mode)'),
    accelerationMPerS2: z
      .number()
      .optional()
      .describe('or slope m a from a uniform acceleration a in m/s^2 (laboratory mode), e.g. 9.80665 sin(tilt) for gravity along a tilted lattice'),
    unit: unitKey,
    offset: z.array(z.number()).min(1).max(3).optional().describe('where the tilt is zero, from the lattice centre per axis, in lengthUnit (default: the centre)'),
    lengthUnit: lengthUnitKey,
  },
  'linear tilt',
);

export const BoxTermSchema = landscapeTerm(
  'box',
  "'box': flat bottom inside a disc, ring or rectangle, a wall outside",
  {
    shape: z.enum(['disc', 'ring', 'rectangle']).describe('disc and ring lie in the x-y plane (cylinders along z in 3D); rectangle has one size per axis'),
    radius: positive().optional().describe('disc radius, lengthUnit'),
    innerRadius: z.number().min(0).optional().describe('ring inner radius, lengthUnit'),
    outerRadius: positive().optional().describe('ring outer radius, lengthUnit'),
    size: z.union([positive(), z.array(positive()).min(1).max(3)]).optional().describe('rectangle full width per axis (one value for all), lengthUnit'),
    angleDeg: z.number().default(0).describe('rectangle rotation in the x-y plane, degrees from x towards y'),
    offset: z.array(z.number()).min(1).max(3).optional().describe('box centre from the lattice centre per axis, lengthUnit (default: the centre)'),
    wallHeight: z.number().describe('energy outside the box, in unit (negative: a dimple)'),
    edgeWidth: z
      .number()
      .min(0)
      .default(0)
      .describe('edge softness: sigma of a Gaussian blur of the sharp edge (erf profile, 10-90 % rise 2.563 sigma), lengthUnit; 0 is a step'),
    unit: unitKey,
    lengthUnit: lengthUnitKey,
  },
  'flat-bottomed box',
);

export const SuperlatticeTermSchema = landscapeTerm(
  'superlattice',
  "'superlattice': a second standing wave V2 sin^2(pi x / period + phase) along one axis",
  {
    axis: z.enum(['x', 'y', 'z']).default('x').describe('lattice axis the second standing wave runs along'),
    depth: z.number().min(0).optional().describe('amplitude V2 in unit'),
    depthEr: z.number().min(0).max(400).optional().describe('or amplitude in recoil energies of its own wavelength h^2/(2 m wavelength^2) (laboratory mode, with wavelengthNm)'),
    periodSites: positive().optional().describe('period of sin^2 in lattice sites (irrational: quasi-periodic)'),
    wavelengthNm: positive().max(100_000).optional().describe('or its wavelength (laboratory mode): period = wavelengthNm / lattice wavelength along axis'),
    phaseRad: z.number().default(0).describe('phase in radians, x in sites measured from site 0'),
    tunnelling: z
      .enum(['unchanged', 'combined'])
      .default('unchanged')
      .describe('"combined" (laboratory mode): J, U and site energies from Wannier functions of the combined lattice; "unchanged": V2 sampled at the sites'),
    unit: unitKey,
  },
  'second standing wave',
);

export const LandscapeTermSchema = z.discriminatedUnion('kind', [SitesTermSchema, ImageTermSchema, GradientTermSchema, BoxTermSchema, SuperlatticeTermSchema]);

export const LandscapeSchema = z
  .array(LandscapeTermSchema)
  .max(64)
  .describe('potential terms added to the trap: sites, image, gradient, box, superlattice (see each kind)');

export type LandscapeTerm = z.output<typeof LandscapeTermSchema>;

interface LandscapeContext {
  dims: number;
  laboratory: boolean;
  envelopeVariesHubbard: boolean;
}

/** Cross-field checks of the landscape list: [path, message] pairs for the scenario's superRefine. */
export function landscapeIssues(terms: readonly LandscapeTerm[] | undefined, ctx: LandscapeContext): Array<[PropertyKey[], string]> {
  const out: Array<[PropertyKey[], string]> = [];
  if (!terms) return out;
  const labOnly = (path: PropertyKey[], what: string): void => {
    if (!ctx.laboratory) out.push([path, `${what} needs laboratory mode (the lattice spacing and the atoms' mass)`]);
  };
  const count = (...values: unknown[]): number => values.filter((v) => v !== undefined).length;
  terms.forEach((t, i) => {
    const at = (...rest: PropertyKey[]): PropertyKey[] => ['landscape', i, ...rest];
    if (t.unit !== undefined && t.unit !== 'J' && t.unit !== 'U') labOnly(at('unit'), `unit ${t.unit}`);
    if (t.kind === 'box' || t.kind === 'image' || t.kind === 'gradient') {
      if (t.lengthUnit === 'um') labOnly(at('lengthUnit'), 'lengthUnit "um"');
      const usesLengths = t.kind === 'box' || t.kind === 'image' || (t.kind === 'gradient' && t.offset !== undefined);
      if (ctx.laboratory && usesLengths && t.lengthUnit === undefined) {
        out.push([at('lengthUnit'), 'required in laboratory mode: "um" (micrometres) or "sites" (lattice spacings)']);
      }
    }
    if ('file' in t) {
      const lower = t.file.toLowerCase();
      if (t.kind === 'sites' && !lower.endsWith('.npy')) out.push([at('file'), 'expected an .npy file of per-site energies']);
      if (t.kind === 'image' && !lower.endsWith('.npy') && !lower.endsWith('.png')) out.push([at('file'), 'expected a .npy or .png picture']);
      if (t.kind === 'image' && lower.endsWith('.png') && t.energyPerLevel === undefined) {
        out.push([at('energyPerLevel'), 'required for a PNG picture: the energy of one grey level']);
      }
    }
    if (t.kind === 'gradient') {
      if (t.direction.length !== ctx.dims) out.push([at('direction'), `expected ${ctx.dims} components (one per lattice axis), got ${t.direction.length}`]);
      else if (t.direction.every((c) => c === 0)) out.push([at('direction'), 'expected a non-zero vector']);
      if (t.offset && t.offset.length !== ctx.dims) out.push([at('offset'), `expected ${ctx.dims} components (one per lattice axis), got ${t.offset.length}`]);
      if (count(t.perSite, t.perUm, t.accelerationMPerS2) !== 1) out.push([at(), 'give exactly one of perSite, perUm and accelerationMPerS2']);
      if (t.perUm !== undefined) labOnly(at('perUm'), 'perUm');
      if (t.accelerationMPerS2 !== undefined) labOnly(at('accelerationMPerS2'), 'accelerationMPerS2');
    }
    if (t.kind === 'box') {
      if (t.offset && t.offset.length !== ctx.dims) out.push([at('offset'), `expected ${ctx.dims} components (one per lattice axis), got ${t.offset.length}`]);
      const need = t.shape === 'disc' ? ['radius'] : t.shape === 'ring' ? ['innerRadius', 'outerRadius'] : ['size'];
      const all = ['radius', 'innerRadius', 'outerRadius', 'size'];
      for (const key of all) {
        const present = (t as Record<string, unknown>)[key] !== undefined;
        if (need.includes(key) && !present) out.push([at(key), `required for shape "${t.shape}"`]);
        if (!need.includes(key) && present) out.push([at(key), `not used by shape "${t.shape}"; remove it (a ${t.shape} takes ${need.join(' and ')})`]);
      }
      if (t.shape === 'ring' && t.innerRadius !== undefined && t.outerRadius !== undefined && !(t.innerRadius < t.outerRadius)) {
        out.push([at('innerRadius'), `must be smaller than outerRadius (${t.outerRadius}), got ${t.innerRadius}`]);
      }
      if (Array.isArray(t.size) && t.size.length !== 1 && t.size.length !== ctx.dims) {
        out.push([at('size'), `expected one value or ${ctx.dims} (one per lattice axis), got ${t.size.length}`]);
      }
    }
    if (t.kind === 'superlattice') {
      const axis = 'xyz'.indexOf(t.axis);
      if (axis >= ctx.dims) out.push([at('axis'), `a ${ctx.dims}D lattice has no ${t.axis} axis`]);
      if (count(t.depth, t.depthEr) !== 1) out.push([at(), 'give exactly one of depth (in unit) and depthEr']);
      if (count(t.periodSites, t.wavelengthNm) !== 1) out.push([at(), 'give exactly one of periodSites and wavelengthNm']);
      if (t.wavelengthNm !== undefined) labOnly(at('wavelengthNm'), 'wavelengthNm');
      if (t.depthEr !== undefined) {
        labOnly(at('depthEr'), 'depthEr');
        if (t.wavelengthNm === undefined) out.push([at('depthEr'), 'is in recoil energies of the second wavelength: give wavelengthNm, or depth in unit with periodSites']);
      }
      if (t.tunnelling === 'combined') {
        labOnly(at('tunnelling'), 'tunnelling "combined"');
        if (ctx.envelopeVariesHubbard) {
          out.push([at('tunnelling'), '"combined" cannot yet be used with laboratory.envelopeVariesHubbard; set one of them off']);
        }
      }
    }
  });
  return out;
}
