// The one table of command-line options. Every option any command takes is declared here
// once, with its flags, its help text and how its value is read (numberText.ts for every
// number, with the option's range and unit). Commands pick the options they use by name
// (`declare`) and read them back checked and converted (`readOptions`); commander only
// splits the command line, so values arrive as text and are converted in one place, and a
// command called directly (as the tests do) goes through the same checks.

import type { Command } from 'commander';
import { InputError } from '../scenario/inputError.js';
import { parseInteger, parseReal, type IntegerRange, type RealRange } from './numberText.js';
import { MAX_REALISATIONS } from '../pipeline/ensemble/blockPlan.js';
import { DEFAULT_BINS_PER_ATOM } from '../pipeline/ensemble/histogramBins.js';
import { DEFAULT_CHAIN_LENGTH, MAX_SCAN_POINTS } from '../pipeline/scan/scanPlan.js';

type Spec =
  | { flags: string; help: string; kind: 'integer'; range: IntegerRange }
  | { flags: string; help: string; kind: 'real'; range: RealRange }
  | { flags: string; help: string; kind: 'text' }
  | { flags: string; help: string; kind: 'choice'; values: readonly string[] }
  | { flags: string; help: string; kind: 'flag' }
  | { flags: string; help: string; kind: 'repeatable' }
  /** `--name [value]`: true when given without a value */
  | { flags: string; help: string; kind: 'optionalText' };

const positive = (unit?: string, what?: string): RealRange => ({ min: 0, minOpen: true, ...(unit ? { unit } : {}), ...(what ? { what } : {}) });

export const OPTION_TABLE = {
  // output and run control (every command that writes)
  out: { flags: '-o, --out <dir>', help: 'output folder', kind: 'text' },
  force: { flags: '--force', help: 'if the output folder exists and was not written by tiercake, move it aside to <name>.replaced-<time> (nothing is deleted)', kind: 'flag' },
  set: { flags: '-s, --set <path=value>', help: 'override a scenario field by its dotted path, e.g. particles.atoms=5000 (repeatable)', kind: 'repeatable' },
  threads: { flags: '-t, --threads <n>', help: 'compute threads, the main thread included (default: all cores)', kind: 'integer', range: { min: 1, max: 256 } },
  quiet: { flags: '-q, --quiet', help: 'no progress output', kind: 'flag' },
  jsonProgress: { flags: '--json-progress', help: 'progress as one JSON object per line on stderr', kind: 'flag' },
  resume: { flags: '--resume [checkpoint]', help: 'continue an interrupted run from its checkpoint (default: <out>.checkpoint)', kind: 'optionalText' },
  // compare: what was measured
  image: { flags: '-i, --image <source>', help: 'measured picture(s): a file (TIFF, FITS, .npy, 16-bit PNG; HDF5 as file.h5:/dataset), a comma-separated list or a folder, read as a[row, col] with row 0 at the top; a multi-page file or 3D array is a stack of shots; needs --counts-per-atom unless it is tiercake\'s own picture with its sidecar', kind: 'text' },
  countsPerAtom: { flags: '--counts-per-atom <x>', help: 'detected counts per atom of --image (1 for a picture already in atoms per pixel); required for --image unless tiercake\'s own sidecar gives it', kind: 'real', range: positive(undefined, 'the detected counts per atom') },
  backgroundFrame: { flags: '--background-frame <source>', help: 'frame(s) without atoms, subtracted from --image before dividing by --counts-per-atom (one for every shot, or one per shot)', kind: 'text' },
  absorptionFrames: { flags: '--absorption-frames <atoms,probe[,dark]>', help: 'absorption imaging from raw frames: with atoms, probe only and optionally dark, each a source as for --image (one frame or one per shot); OD = ln((I_atoms - I_dark) / (I_probe - I_dark)), sigma0 from the species\' D2 line', kind: 'text' },
  saturationCounts: { flags: '--saturation-counts <c>', help: 'counts per pixel and exposure that correspond to the saturation intensity: adds the term (I0 - I)/I_sat (Reinaudi et al. 2007); without it plain Beer-Lambert, said in the output', kind: 'real', range: positive('counts', 'the counts at the saturation intensity') },
  alpha: { flags: '--alpha <a>', help: "Reinaudi's alpha, the factor on ln(I0/I) (default 1)", kind: 'real', range: positive(undefined, 'the factor alpha') },
  odLimit: { flags: '--od-limit <od>', help: 'largest usable optical depth ln(I0/I); pixels above it (or without transmitted light) are masked and counted (default 4)', kind: 'real', range: positive(undefined, 'the optical-depth limit') },
  minProbeCounts: { flags: '--min-probe-counts <c>', help: 'least dark-subtracted probe counts for a pixel to be used; weaker ones are masked and counted (default 20)', kind: 'real', range: positive('counts', 'the least probe counts') },
  crossSection: { flags: '--cross-section <s>', help: "resonant cross-section sigma0 in the length unit squared (µm^2; lattice spacings^2 in dimensionless mode); default 3 lambda^2 / 2 pi of the species' D2 line", kind: 'real', range: positive('length unit squared', 'the cross-section') },
  shots: { flags: '--shots <folder|list>', help: 'shot files processed together (a folder or a comma-separated list); --absorption-frames, --image and --background-frame then name frames inside each file: HDF5 dataset paths (/atoms) or frame indices (0,1,2)', kind: 'text' },
  pixelUm: { flags: '--pixel-um <x>', help: 'pixel size in the object plane, µm (camera pixel / magnification), for a laboratory scenario; a dimensionless one takes --pixel-sites', kind: 'real', range: positive('µm', 'the object-plane pixel size') },
  pixelSites: { flags: '--pixel-sites <x>', help: 'pixel size in lattice spacings, for a dimensionless scenario (which has no micrometres; --pixel-um is for laboratory scenarios)', kind: 'real', range: positive('lattice spacings', 'the pixel size') },
  // compare: clean-up and orientation of the frames
  region: { flags: '--region <x0,y0,width,height>', help: 'keep only this rectangle of the frames: first column, first row (from the top), width and height in pixels', kind: 'text' },
  regionMask: { flags: '--region-mask <file>', help: 'mask picture of the frame size: pixels that are 0 are left out', kind: 'text' },
  hotPixels: { flags: '--hot-pixels', help: 'replace hot and dead pixels of the raw frames by the median of their neighbours (beyond 10 median absolute deviations)', kind: 'flag' },
  backgroundBorder: { flags: '--background-border <n>', help: 'fit a background plane a + b x + c y to a border of n pixels (of the region) and subtract it', kind: 'integer', range: { min: 1, max: 10_000 } },
  transpose: { flags: '--transpose', help: 'swap rows and columns of the measured frames (first, after --region)', kind: 'flag' },
  flipX: { flags: '--flip-x', help: 'mirror the measured frames left-right (after --transpose)', kind: 'flag' },
  flipY: { flags: '--flip-y', help: 'mirror the measured frames top-bottom (after --flip-x)', kind: 'flag' },
  rotate: { flags: '--rotate <deg>', help: 'rotate the measured frames counter-clockwise as displayed, by any angle in degrees (area-conserving resampling; multiples of 90 are exact), last', kind: 'real', range: { min: -360, max: 360, unit: 'degrees', what: 'the rotation angle' } },
  // compare: the fit and what is read off the pictures
  fit: { flags: '--fit <list>', help: 'parameters to fit, comma-separated, each optionally name=lower:upper: atoms or mu, temperature or entropy, trap, angle, psf, offset (the trap centre is fitted unless --centre-pixels)', kind: 'text' },
  centrePixels: { flags: '--centre-pixels <x,y>', help: 'fix the trap centre at this pixel of the given frame (x = column, y = row from the top) instead of fitting it', kind: 'text' },
  maxIterations: { flags: '--max-iterations <n>', help: 'Levenberg-Marquardt steps at most (default 30)', kind: 'integer', range: { min: 1, max: 1000 } },
  binUm: { flags: '--bin-um <x>', help: 'radial bin width of the profiles, µm, for a laboratory scenario (default: one pixel)', kind: 'real', range: positive('µm', 'the radial bin width') },
  binSites: { flags: '--bin-sites <x>', help: 'radial bin width of the profiles in lattice spacings, for a dimensionless scenario (default: one pixel)', kind: 'real', range: positive('lattice spacings', 'the radial bin width') },
  chiSquarePixels: { flags: '--chi-square-pixels <which>', help: "pixels the reduced chi-square counts: 'signal' (where model or data stand above the noise; default) or 'all'", kind: 'choice', values: ['signal', 'all'] },
  bootstrap: { flags: '--bootstrap <n>', help: 'bootstrap resamples over the shots of a stack (default 200; 0: none)', kind: 'integer', range: { min: 0, max: 100_000 } },
  eosBinSites: { flags: '--eos-bin-sites <w>', help: 'radial bin of the equation of state, trap-scaled lattice sites (default 1)', kind: 'real', range: positive('sites', 'the bin width') },
  thermometryBinSites: { flags: '--thermometry-bin-sites <w>', help: 'radial bin of the fluctuation thermometry, trap-scaled lattice sites (default: the larger of 1 and 3 PSF sigmas)', kind: 'real', range: positive('sites', 'the bin width') },
  // diagram
  zjMax: { flags: '--zj-max <x>', help: 'largest zJ/U shown', kind: 'real', range: { min: 0, minOpen: true, max: 10 } },
  mu: { flags: '--mu <from:to>', help: 'range of mu/U', kind: 'text' },
  grid: { flags: '--grid <cols>x<rows>', help: 'grid points along zJ/U and mu/U', kind: 'text' },
  kt: { flags: '--kt <x>', help: 'temperature k_B T/U (0: ground state)', kind: 'real', range: { min: 0, max: 100 } },
  nmax: { flags: '--nmax <n>', help: 'highest occupation kept per site', kind: 'integer', range: { min: 2, max: 40 } },
  shade: { flags: '--shade <field>', help: "colour by 'phi' (order parameter) or 'density'", kind: 'choice', values: ['phi', 'density'] },
  cluster: { flags: '--cluster <shape>', help: 'also draw the Mott lobes of cluster mean field for this cluster, e.g. 2x2 (square lattice) or 2x2x2 (cubic), T = 0, with the quantum Monte Carlo tip for comparison', kind: 'text' },
  // hubbard
  species: { flags: '--species <name>', help: 'isotope from the built-in table, e.g. 87Rb', kind: 'text' },
  massU: { flags: '--mass-u <u>', help: 'or: atomic mass in u (with --scattering-bohr)', kind: 'real', range: positive('u', 'the atomic mass') },
  scatteringBohr: { flags: '--scattering-bohr <a0>', help: 's-wave scattering length in Bohr radii (overrides the table value)', kind: 'real', range: positive('Bohr radii', 'the scattering length') },
  wavelengthNm: { flags: '--wavelength-nm <nm>', help: 'lattice laser wavelength in nm', kind: 'real', range: positive('nm', 'the lattice wavelength') },
  depth: { flags: '--depth <from:to:count | s>', help: 'lattice depths in E_r: one value or a range', kind: 'text' },
  axes: { flags: '--axes <n>', help: 'lattice axes: 3 (cubic), 2 (layer) or 1 (tubes)', kind: 'integer', range: { min: 1, max: 3 } },
  confinementHz: { flags: '--confinement-hz <f>', help: 'trap frequency along the axes without lattice (layer or tubes), Hz', kind: 'real', range: positive('Hz', 'the trap frequency') },
  powerW: { flags: '--power-w <P>', help: 'also estimate the depth of one retro-reflected beam of this power (W)', kind: 'real', range: positive('W', 'the beam power') },
  waistUm: { flags: '--waist-um <w>', help: 'waist of that beam at the atoms, µm (with --power-w)', kind: 'real', range: positive('µm', 'the beam waist') },
  // ensemble
  realisations: { flags: '-n, --realisations <N>', help: 'number of disorder realisations (realisation r uses the seed "<disorder.seed>/r")', kind: 'integer', range: { min: 1, max: MAX_REALISATIONS } },
  blockSize: { flags: '--block-size <B>', help: 'realisations per block, the fixed grouping of the sums (default 4); shards hold whole blocks', kind: 'integer', range: { min: 1, max: MAX_REALISATIONS } },
  shard: { flags: '--shard <k/K>', help: 'run only shard k of K (k counted from 0) and write a partial result for `tiercake merge`', kind: 'text' },
  shardFromEnv: { flags: '--shard-from-env [variable]', help: 'take the shard index k from an environment variable (default SLURM_ARRAY_TASK_ID); needs --shards', kind: 'optionalText' },
  shards: { flags: '--shards <K>', help: 'number of shards, with --shard-from-env', kind: 'integer', range: { min: 1, max: 1_000_000 } },
  parallelOver: { flags: '--parallel-over <mode>', help: 'auto | realisations | lattice (auto: realisations side by side on small lattices, else one at a time on all threads)', kind: 'choice', values: ['auto', 'realisations', 'lattice'] },
  // evolve
  modulationFrequencies: { flags: '--modulation-frequencies <from:to:count | f>', help: 'modulation spectrum of the evolved cloud at these frequencies h f, in the energy unit of the scenario (replaces evolution.spectrum frequencies)', kind: 'text' },
  binsPerAtom: { flags: '--bins-per-atom <b>', help: `histogram bins per atom per site (default ${DEFAULT_BINS_PER_ATOM})`, kind: 'integer', range: { min: 1, max: 10_000 } },
  // scan
  vary: { flags: '--vary <path=values>', help: 'scenario value to scan: PATH=FROM:TO:COUNT (equal steps), PATH=FROM:TO:COUNT:log, or PATH=A,B,C; once or twice (a map); PATH may be characteristicDensity', kind: 'repeatable' },
  log: { flags: '--log', help: 'logarithmic steps for every FROM:TO:COUNT axis', kind: 'flag' },
  fixed: { flags: '--fixed <what>', help: 'with --vary characteristicDensity: what stays fixed, trap (the atom number follows, default) or atoms (the trap curvature follows)', kind: 'choice', values: ['trap', 'atoms'] },
  chainLength: { flags: '--chain-length <L>', help: `points per warm-start chain (default ${DEFAULT_CHAIN_LENGTH}); each chain starts cold, shards hold whole chains`, kind: 'integer', range: { min: 1, max: MAX_SCAN_POINTS } },
  keepPoints: { flags: '--keep-points', help: 'also write every point as `tiercake solve` would (points/point-NNNNNN/)', kind: 'flag' },
  // submit
  ensemble: { flags: '--ensemble <N>', help: 'submit a disorder ensemble of N realisations', kind: 'integer', range: { min: 1, max: MAX_REALISATIONS } },
  scan: { flags: '--scan', help: 'submit a scan (with --vary)', kind: 'flag' },
  partition: { flags: '--partition <name>', help: 'SLURM partition of the jobs', kind: 'text' },
  time: { flags: '--time <limit>', help: 'SLURM time limit of each shard task, e.g. 30, 02:00:00 or 1-00:00:00', kind: 'text' },
  cpusPerTask: { flags: '--cpus-per-task <c>', help: 'cores of each shard task, also its --threads (default 1)', kind: 'integer', range: { min: 1, max: 256 } },
  sbatchOption: { flags: '--sbatch-option <option>', help: 'extra sbatch option for every job, e.g. --sbatch-option=--account=lab42 (repeatable)', kind: 'repeatable' },
  dryRun: { flags: '--dry-run', help: 'print the batch scripts and the sbatch commands; submit nothing, write nothing', kind: 'flag' },
  hold: { flags: '--hold', help: 'submit the shard tasks held (release them with scontrol release JOB)', kind: 'flag' },
  onlyShards: { flags: '--only-shards <list>', help: 'submit only these shards again (e.g. 2,5) into an earlier submission folder, with a new merge job', kind: 'text' },
  sbatch: { flags: '--sbatch <command>', help: 'the sbatch program (default: sbatch from PATH)', kind: 'text' },
} as const satisfies Record<string, Spec>;

export type OptionName = keyof typeof OPTION_TABLE;

type ValueOf<S> = S extends { kind: 'integer' | 'real' }
  ? number
  : S extends { kind: 'flag' }
    ? boolean
    : S extends { kind: 'repeatable' }
      ? string[]
      : S extends { kind: 'optionalText' }
        ? string | true
        : string;

/** The values of the options `N`, checked and converted; undefined where not given. */
export type OptionValues<N extends OptionName> = { [K in N]?: ValueOf<(typeof OPTION_TABLE)[K]> };

/** What commander hands over: text, true for flags, a list for repeatable options. */
export type RawOptions = Readonly<Record<string, string | boolean | string[] | undefined>>;

const collect = (value: string, previous: string[] | undefined): string[] => [...(previous ?? []), value];

export interface DeclareOverrides {
  /** help text used instead of the table's */
  help?: string;
  /** default value as it would be typed (shown in --help) */
  default?: string;
  required?: boolean;
}

/** Add the named options of the table to a command. */
export function declare(command: Command, names: readonly OptionName[], overrides: Partial<Record<OptionName, DeclareOverrides>> = {}): Command {
  for (const name of names) {
    const spec: Spec = OPTION_TABLE[name];
    const o = overrides[name] ?? {};
    const help = o.help ?? spec.help;
    if (spec.kind === 'repeatable') command.option(spec.flags, help, collect, []);
    else if (o.required) command.requiredOption(spec.flags, help, o.default);
    else if (o.default !== undefined) command.option(spec.flags, help, o.default);
    else command.option(spec.flags, help);
  }
  return command;
}

/** 'a', 'a or b', 'a, b or c'. */
function oneOf(values: readonly string[]): string {
  return values.length <= 1 ? (values[0] ?? '') : `${values.slice(0, -1).join(', ')} or ${values[values.length - 1]}`;
}

function optionLabel(spec: Spec): string {
  const long = spec.flags.split(/[ ,]+/).find((f) => f.startsWith('--'));
  return long ?? spec.flags;
}

/** Read the named options from commander's raw values, every number through numberText.ts. */
export function readOptions<N extends OptionName>(raw: RawOptions, names: readonly N[]): OptionValues<N> {
  const out: Record<string, unknown> = {};
  for (const name of names) {
    const spec: Spec = OPTION_TABLE[name];
    const value = raw[name];
    if (value === undefined || value === false) continue;
    const label = optionLabel(spec);
    switch (spec.kind) {
      case 'flag':
        out[name] = value === true;
        break;
      case 'repeatable':
        out[name] = Array.isArray(value) ? [...value] : [String(value)];
        break;
      case 'optionalText':
        out[name] = value === true ? true : String(value);
        break;
      case 'integer':
        out[name] = parseInteger(String(value), label, spec.range);
        break;
      case 'real':
        out[name] = parseReal(String(value), label, spec.range);
        break;
      case 'choice': {
        const text = String(value);
        if (!spec.values.includes(text)) throw new InputError(`${label}: expected ${oneOf(spec.values)}, got ${JSON.stringify(text)}`);
        out[name] = text;
        break;
      }
      case 'text':
        out[name] = String(value);
        break;
    }
  }
  return out as OptionValues<N>;
}
