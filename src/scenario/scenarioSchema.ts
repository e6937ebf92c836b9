// The scenario file: the single source of configuration types, bounds, defaults and the
// documentation of every key (the README's reference table is generated from it).
// Objects are strict: an unknown key is an error, with the nearest valid key suggested
// (see formatScenarioError.ts).

import * as z from 'zod';
import { CameraSchema, imagingModeIssues, TimeOfFlightSchema } from './imagingSchema.js';
import { LandscapeSchema, landscapeIssues } from './landscapeSchema.js';
import { EvolutionSchema, evolutionIssues } from './evolutionSchema.js';
import { EnergyUnitSchema } from './scenarioEnergyUnit.js';

const finite = (): z.ZodNumber => z.number();
const positive = (): z.ZodNumber => z.number().positive();
const perAxis = (item: z.ZodNumber) => z.union([item, z.array(item).min(1).max(3)]);

const boundary = z.enum(['open', 'periodic']);

export const LatticeSchema = z
  .strictObject({
    shape: z
      .array(z.int().min(1).max(100_000))
      .min(1)
      .max(3)
      .describe('sites per axis, 1 to 3 axes (first axis x); e.g. [64, 64] for a 2D layer'),
    boundary: z
      .union([boundary, z.array(boundary).min(1).max(3)])
      .default('open')
      .describe("'open' or 'periodic', for all axes or per axis; periodic axes need an even length"),
  })
  .describe('lattice geometry');

export const HubbardSchema = z
  .strictObject({
    hopping: perAxis(positive())
      .optional()
      .describe('nearest-neighbour hopping J (per axis allowed), in the energy unit; give it when energyUnit is U'),
    interaction: positive().optional().describe('on-site interaction U, in the energy unit; give it when energyUnit is J'),
  })
  .describe('dimensionless model: Bose-Hubbard parameters directly (use this or laboratory)');

export const SpeciesSchema = z.union([
  z.string().min(1).max(40).regex(/^[A-Za-z0-9 _-]+$/, 'an isotope name such as 87Rb').describe('isotope name from the built-in table, e.g. "87Rb"'),
  z.strictObject({
    massU: positive().describe('atomic mass in unified atomic mass units'),
    scatteringLengthBohr: positive().optional().describe('s-wave scattering length in Bohr radii'),
    scatteringLengthNm: positive().optional().describe('s-wave scattering length in nm'),
  }),
]);

export const LaboratorySchema = z
  .strictObject({
    species: SpeciesSchema.describe('built-in isotope name or {massU, scatteringLengthBohr | scatteringLengthNm}'),
    wavelengthNm: positive().max(100_000).describe('lattice laser wavelength in nm (lattice spacing = wavelength/2)'),
    depthEr: perAxis(z.number().min(0).max(500)).describe('lattice depth per axis in recoil energies E_r'),
    transverse: z
      .strictObject({
        trapFrequencyHz: positive().optional().describe('harmonic confinement along the axes the lattice does not resolve, Hz'),
        depthEr: positive().optional().describe('or: lattice depth along those axes, E_r (one site thick)'),
        wavelengthNm: positive().max(100_000).optional().describe('with depthEr: wavelength of that lattice in nm, if not the lattice wavelength (its depth is in its own E_r)'),
      })
      .optional()
      .describe('for 1D and 2D lattices: what holds the atoms along the missing axes'),
    beamWaistUm: perAxis(positive())
      .optional()
      .describe('1/e^2 waist of each red-detuned lattice beam, µm: adds the harmonic confinement of the beam envelope to the trap'),
    envelopeVariesHubbard: z
      .boolean()
      .default(false)
      .describe('with beamWaistUm: let J and U follow the local lattice depth across the cloud (site by site) instead of their values at the centre'),
  })
  .describe('laboratory description: tiercake computes J and U from Wannier functions (use this or hubbard)');

const seedText = z.string().min(1).max(200);

export const BoxDisorderSchema = z
  .strictObject({
    kind: z.literal('box').describe("'box': eps_i uniform in [-width/2, width/2]"),
    width: z.number().min(0).describe('full width W of the box distribution, in the energy unit'),
    seed: seedText.default('disorder').describe('named seed of the realisation; the same seed gives the same field everywhere'),
  })
  .describe('box disorder');

export const SpeckleDisorderSchema = z
  .strictObject({
    kind: z.literal('speckle').describe("'speckle': optical speckle of a beam through a diffuser and a lens"),
    meanStrength: z.number().min(0).describe('ensemble mean |eps| of the speckle potential, in the energy unit'),
    sign: z.enum(['repulsive', 'attractive']).default('repulsive').describe('repulsive (blue detuned, eps >= 0) or attractive (red detuned)'),
    grainSites: positive().optional().describe('grain size: first zero of the intensity autocorrelation, in lattice sites'),
    grainUm: positive().optional().describe('or: grain size in µm (laboratory mode)'),
    numericalAperture: positive().max(1).optional().describe('or: numerical aperture of the speckle optics (with wavelengthNm; laboratory mode)'),
    wavelengthNm: positive().optional().describe('speckle light wavelength in nm (with numericalAperture)'),
    beamAxis: z.enum(['x', 'y', 'z']).default('z').describe('3D: axis along which the speckle beam travels (grains are elongated along it)'),
    longitudinalGrainSites: positive().optional().describe('3D: grain length along the beam in sites (default from the aperture, or 3.3/NA x grain)'),
    wannierAverage: z.boolean().default(false).describe('average the intensity over the Wannier density instead of sampling at site centres'),
    seed: seedText.default('disorder').describe('named seed of the realisation'),
  })
  .describe('speckle disorder');

export const DisorderSchema = z.discriminatedUnion('kind', [BoxDisorderSchema, SpeckleDisorderSchema]);

export const TrapSchema = z
  .strictObject({
    coefficient: perAxis(z.number().min(0))
      .optional()
      .describe('dimensionless mode: eps = sum_d coefficient_d (x_d - centre_d)^2, energy unit per site^2'),
    frequencyHz: perAxis(z.number().min(0)).optional().describe('laboratory mode: trap frequency per axis in Hz (f, not omega)'),
    centreSites: z.array(finite()).min(1).max(3).optional().describe('trap centre in site coordinates (default: lattice centre)'),
  })
  .describe('harmonic trap');

export const ParticlesSchema = z
  .strictObject({
    atoms: positive().optional().describe('total atom number N; the chemical potential is solved for'),
    chemicalPotential: finite().optional().describe('chemical potential mu at the trap centre, in the energy unit'),
  })
  .describe('give exactly one of atoms and chemicalPotential');

export const TemperatureSchema = z
  .strictObject({
    kT: z.number().min(0).optional().describe('k_B T in the energy unit (0: ground state)'),
    nanokelvin: z.number().min(0).optional().describe('laboratory mode: temperature in nK'),
    entropyPerAtom: z.number().min(0).optional().describe('entropy per atom in units of k_B; T is solved for'),
  })
  .describe('give at most one; default is the ground state (kT = 0)');

export const TruncationSchema = z
  .strictObject({
    nmax: z.int().min(1).max(60).default(6).describe('highest occupation kept per site'),
    automatic: z.boolean().default(true).describe('raise nmax and solve again when the truncation weight is too large'),
    topWeightMax: positive().max(0.1).default(1e-6).describe('largest allowed probability of |nmax> at any site'),
  })
  .describe('Fock-space truncation');

/** Largest Fock dimension (nmax + 1)^sites of one cluster the cluster method accepts (memory: ~30 vectors of it). */
export const CLUSTER_MAX_STATES = 1 << 20;

/** Sites of a cluster shape (1 without clusters). */
export function clusterSites(cluster: readonly number[] | undefined): number {
  return cluster === undefined ? 1 : cluster.reduce((a, b) => a * b, 1);
}

export const SolverSchema = z
  .strictObject({
    tolerance: positive().max(1e-2).default(1e-8).describe('stop when max |delta phi| and its estimated remaining error are below this'),
    maxSweeps: z.int().min(1).max(10_000_000).default(20_000).describe('sweep budget for the whole solve (all mu steps)'),
    accelerate: z.boolean().default(true).describe('extrapolate the slowest mode against critical slowing down'),
    atomTolerance: positive().max(0.1).default(1e-6).describe('relative accuracy of the atom number at fixed N'),
    compressibility: z.boolean().default(true).describe('compute the local compressibility map dn/dmu (two extra solves)'),
    kernel: z
      .enum(['auto', 'wasm', 'js'])
      .default('auto')
      .describe(
        'site kernel: "auto" (WebAssembly where it can run, else JavaScript), "wasm", or "js" (the reference); all give the same numbers. The environment variable TIERCAKE_KERNEL overrides it',
      ),
    cluster: z
      .array(z.int().min(1).max(16))
      .min(1)
      .max(3)
      .optional()
      .describe(
        'cluster mean field: the cluster shape, one extent per lattice axis (e.g. [2, 2]); the lattice is tiled by clusters solved exactly in the mean fields of their neighbours. Omitted or all 1: the single-site Gutzwiller solver. Cost grows as (nmax + 1)^sites',
      ),
    stiffness: z.boolean().default(false).describe('superfluid fraction per periodic axis from the curvature of the grand potential under a phase twist (four extra twisted solves per axis, one thread)'),
  })
  .describe('self-consistency settings');

export const PhasesSchema = z
  .strictObject({
    condensateFractionMax: positive().max(0.5).default(0.02).describe('local condensate fraction |phi|^2/n above this: superfluid; at or below it a site can be a Mott shell (proximity-induced coherence is reported, not used to erase the shell)'),
    condensateMin: positive().default(1e-4).describe('absolute floor: |phi|^2 at or below this never counts as a condensate, whatever the fraction'),
    integerTolerance: positive().max(0.5).default(0.05).describe('|n - round(n)| at or below this (and no condensate of its own): Mott insulator'),
    compressibilityMin: positive().default(0.5).describe('T > 0: kT dn/dmu above this fraction of 1/4 (the atomic-limit normal fluid between two fillings at the same kT): compressible, not Mott; unused at T = 0'),
    emptyDensityMax: positive().max(0.5).default(0.01).describe('density below this: empty'),
    bulkDensityFraction: positive().max(0.9).default(0.1).describe('superfluid spanning is tested on the bulk: sites with density above this fraction of the peak density'),
    bulkErosionSites: z.int().min(0).max(5).default(1).describe('the bulk for the spanning test is eroded by this many sites (removes one-site paths along its border)'),
  })
  .describe('thresholds for the site-by-site phase labels (reasons in the report)');

export const ProfilesSchema = z
  .strictObject({
    binWidthSites: positive().max(1000).default(1).describe('width of the radial bins in (trap-scaled) lattice sites'),
  })
  .describe('radial profiles');

export const ScenarioSchema = z
  .strictObject({
    name: z
      .string()
      .regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,79}$/, 'letters, digits, ".", "_" and "-" only, at most 80 characters')
      .describe('scenario name (used in titles and as the default output folder)'),
    description: z.string().max(2000).optional().describe('free text shown in the report'),
    energyUnit: EnergyUnitSchema.optional().describe('unit of every energy in the file: J or U in dimensionless mode; Hz, kHz or nK (also J or U) in laboratory mode'),
    lattice: LatticeSchema,
    hubbard: HubbardSchema.optional(),
    laboratory: LaboratorySchema.optional(),
    trap: TrapSchema.optional(),
    disorder: DisorderSchema.optional().describe('random site potential added to the trap (box or speckle)'),
    landscape: LandscapeSchema.optional(),
    particles: ParticlesSchema,
    temperature: TemperatureSchema.prefault({}),
    truncation: TruncationSchema.prefault({}),
    solver: SolverSchema.prefault({}),
    phases: PhasesSchema.prefault({}),
    profiles: ProfilesSchema.prefault({}),
    camera: CameraSchema.optional(),
    timeOfFlight: TimeOfFlightSchema.optional(),
    evolution: EvolutionSchema.optional(),
  })
  .superRefine((s, ctx) => {
    const issue = (path: PropertyKey[], message: string): void => ctx.addIssue({ code: 'custom', path, message });
    const dims = s.lattice.shape.length;
    const perAxisLength = (v: number | number[] | undefined, path: PropertyKey[]): void => {
      if (Array.isArray(v) && v.length !== 1 && v.length !== dims) {
        issue(path, `expected one value or ${dims} (one per lattice axis), got ${v.length}`);
      }
    };
    const periodicAxes = Array.isArray(s.lattice.boundary)
      ? s.lattice.boundary.length === 1
        ? Array(dims).fill(s.lattice.boundary[0])
        : s.lattice.boundary
      : Array(dims).fill(s.lattice.boundary);
    s.lattice.shape.forEach((n, d) => {
      if (periodicAxes[d] === 'periodic' && n % 2 !== 0) {
        issue(['lattice', 'shape', d], `a periodic axis needs an even length for the red-black update, got ${n}; make it even or make that boundary open`);
      }
    });
    const cluster = s.solver.cluster;
    if (s.solver.stiffness && cluster !== undefined && cluster.some((c) => c > 1)) {
      issue(['solver', 'stiffness'], 'the twisted solves behind the superfluid fraction are single-site; drop solver.stiffness or solver.cluster');
    }
    if (cluster !== undefined) {
      if (cluster.length !== dims) {
        issue(['solver', 'cluster'], `expected ${dims} extents (one per lattice axis), got ${cluster.length}`);
      } else {
        cluster.forEach((c, d) => {
          if (c > s.lattice.shape[d]) issue(['solver', 'cluster', d], `the cluster extent ${c} is longer than the lattice axis (${s.lattice.shape[d]} sites)`);
          else if (periodicAxes[d] === 'periodic' && s.lattice.shape[d] % c !== 0) {
            issue(['solver', 'cluster', d], `on a periodic axis the cluster extent must divide the length ${s.lattice.shape[d]}, got ${c}`);
          }
        });
        const states = (s.truncation.nmax + 1) ** clusterSites(cluster);
        if (states > CLUSTER_MAX_STATES) {
          issue(
            ['solver', 'cluster'],
            `a [${cluster.join(', ')}] cluster at truncation.nmax ${s.truncation.nmax} has ${states.toExponential(2)} Fock states (limit ${CLUSTER_MAX_STATES}): use a smaller cluster or lower nmax`,
          );
        }
      }
    }
    if (Array.isArray(s.lattice.boundary) && s.lattice.boundary.length !== dims) {
      issue(['lattice', 'boundary'], `expected one value or ${dims} (one per lattice axis), got ${s.lattice.boundary.length}`);
    }
    if (!s.hubbard === !s.laboratory) {
      issue(['hubbard'], 'give exactly one of "hubbard" (J and U directly) and "laboratory" (species, wavelength, depth)');
    }
    if (s.hubbard) {
      const unit = s.energyUnit ?? 'J';
      if (unit !== 'J' && unit !== 'U') {
        issue(['energyUnit'], `in dimensionless mode (hubbard) the energy unit must be J or U, got ${unit}`);
      }
      if (unit === 'J') {
        if (s.hubbard.interaction === undefined) issue(['hubbard', 'interaction'], 'required when energyUnit is J: give U/J');
        if (s.hubbard.hopping !== undefined && !Array.isArray(s.hubbard.hopping) && s.hubbard.hopping !== 1) {
          issue(['hubbard', 'hopping'], 'with energyUnit J the hopping is 1 by definition; omit it or give per-axis values relative to J');
        }
      } else if (unit === 'U') {
        if (s.hubbard.hopping === undefined) issue(['hubbard', 'hopping'], 'required when energyUnit is U: give J/U');
        if (s.hubbard.interaction !== undefined && s.hubbard.interaction !== 1) {
          issue(['hubbard', 'interaction'], 'with energyUnit U the interaction is 1 by definition; omit it');
        }
      }
      perAxisLength(s.hubbard.hopping, ['hubbard', 'hopping']);
      if (s.trap?.frequencyHz !== undefined) issue(['trap', 'frequencyHz'], 'needs laboratory mode; in hubbard mode use trap.coefficient');
      if (s.temperature.nanokelvin !== undefined) {
        issue(['temperature', 'nanokelvin'], 'needs laboratory mode; in hubbard mode use temperature.kT in the energy unit');
      }
    }
    if (s.laboratory) {
      perAxisLength(s.laboratory.depthEr, ['laboratory', 'depthEr']);
      if (s.trap?.coefficient !== undefined) issue(['trap', 'coefficient'], 'in laboratory mode give trap.frequencyHz instead');
      if (dims < 3 && !s.laboratory.transverse) {
        issue(['laboratory', 'transverse'], `a ${dims}D lattice needs the confinement along the missing axes: transverse.trapFrequencyHz or transverse.depthEr`);
      }
      if (s.laboratory.transverse) {
        const t = s.laboratory.transverse;
        if ((t.trapFrequencyHz === undefined) === (t.depthEr === undefined)) {
          issue(['laboratory', 'transverse'], 'give exactly one of trapFrequencyHz and depthEr');
        }
        if (t.wavelengthNm !== undefined && t.depthEr === undefined) {
          issue(['laboratory', 'transverse', 'wavelengthNm'], 'only used with transverse.depthEr (a transverse lattice)');
        }
      }
      if (typeof s.laboratory.species !== 'string') {
        const sp = s.laboratory.species;
        if ((sp.scatteringLengthBohr === undefined) === (sp.scatteringLengthNm === undefined)) {
          issue(['laboratory', 'species'], 'give exactly one of scatteringLengthBohr and scatteringLengthNm');
        }
      }
    }
    if (s.disorder?.kind === 'speckle') {
      const d = s.disorder;
      const ways = [d.grainSites !== undefined, d.grainUm !== undefined, d.numericalAperture !== undefined].filter(Boolean).length;
      if (ways !== 1) issue(['disorder'], 'give exactly one of grainSites, grainUm and numericalAperture (with wavelengthNm)');
      if ((d.grainUm !== undefined || d.numericalAperture !== undefined) && !s.laboratory) {
        issue(['disorder', d.grainUm !== undefined ? 'grainUm' : 'numericalAperture'], 'needs laboratory mode (the lattice spacing); in hubbard mode give grainSites');
      }
      if (d.numericalAperture !== undefined && d.wavelengthNm === undefined) {
        issue(['disorder', 'wavelengthNm'], 'required with numericalAperture');
      }
      if (d.wannierAverage && !s.laboratory) issue(['disorder', 'wannierAverage'], 'needs laboratory mode (the Wannier width comes from the lattice depth)');
      if (d.beamAxis !== 'z' && dims < 3) issue(['disorder', 'beamAxis'], 'only 3D lattices can contain the beam axis; 1D and 2D lattices lie across the beam');
    }
    if (s.laboratory?.beamWaistUm !== undefined) perAxisLength(s.laboratory.beamWaistUm, ['laboratory', 'beamWaistUm']);
    if (s.laboratory?.envelopeVariesHubbard && s.laboratory.beamWaistUm === undefined) {
      issue(['laboratory', 'envelopeVariesHubbard'], 'needs laboratory.beamWaistUm (the waists set how the depth falls off)');
    }
    perAxisLength(s.trap?.coefficient, ['trap', 'coefficient']);
    perAxisLength(s.trap?.frequencyHz, ['trap', 'frequencyHz']);
    if (s.trap?.centreSites && s.trap.centreSites.length !== dims) {
      issue(['trap', 'centreSites'], `expected ${dims} coordinates (one per lattice axis), got ${s.trap.centreSites.length}`);
    }
    if ((s.particles.atoms === undefined) === (s.particles.chemicalPotential === undefined)) {
      issue(['particles'], 'give exactly one of particles.atoms and particles.chemicalPotential');
    }
    const t = s.temperature;
    const given = [t.kT, t.nanokelvin, t.entropyPerAtom].filter((v) => v !== undefined).length;
    if (given > 1) issue(['temperature'], 'give at most one of kT, nanokelvin and entropyPerAtom');
    if (t.entropyPerAtom !== undefined && s.particles.atoms === undefined) {
      issue(['temperature', 'entropyPerAtom'], 'fixed entropy per atom needs a fixed atom number: give particles.atoms');
    }
    for (const [path, message] of imagingModeIssues(s.camera, s.timeOfFlight, s.laboratory !== undefined)) issue(path, message);
    for (const [path, message] of landscapeIssues(s.landscape, {
      dims,
      laboratory: s.laboratory !== undefined,
      envelopeVariesHubbard: s.laboratory?.envelopeVariesHubbard === true,
    })) {
      issue(path, message);
    }
    for (const [path, message] of evolutionIssues(s.evolution, {
      dims,
      laboratory: s.laboratory !== undefined,
      has: (key) =>
        key === 'trap' ? s.trap !== undefined : key === 'disorder.width' ? s.disorder?.kind === 'box' : key === 'disorder.meanStrength' ? s.disorder?.kind === 'speckle' : false,
      landscape: (s.landscape ?? []).map((t) => ({
        kind: t.kind,
        combined: t.kind === 'superlattice' && t.tunnelling === 'combined',
        present: (key: string) => (t as Record<string, unknown>)[key] !== undefined,
      })),
    })) {
      issue(path, message);
    }
  });

export type ScenarioInput = z.input<typeof ScenarioSchema>;
export type Scenario = z.output<typeof ScenarioSchema>;
