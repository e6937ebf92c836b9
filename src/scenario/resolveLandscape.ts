// The scenario's `landscape` terms (landscapeSchema.ts) as site energies in the solver's
// internal energy unit, plus, for a superlattice with tunnelling "combined" (laboratory
// mode), site-resolved J and U of the combined lattice. Reads and checks the files (path
// relative to the scenario file), converts units and lengths, and calls the pure term
// functions of src/lattice/landscape and src/physics/combinedLatticeWannier.ts. Every problem
// is an InputError naming `landscape[i]` and its key.
//
// Each term gets a JSON-safe record (name, kind, min/max energy in the scenario's unit, file
// path, size and SHA-256, how it was built) for the summary and the report; its site
// energies come separately in `fields` (same order).

import { createHash } from 'node:crypto';
import { readFileSync, statSync } from 'node:fs';
import { isAbsolute, resolve } from 'node:path';
import type { LatticeGeometry } from '../lattice/latticeGeometry.js';
import { alongAxis, boxPotential, gradientPotential, imagePotential, standingWaveProfile, type BoxShape, type PotentialImage } from '../lattice/landscape/index.js';
import { combinedLatticeAxis, type ExtraStandingWave } from '../physics/combinedLatticeWannier.js';
import { planckJs } from '../physics/constants.js';
import { recoilEnergyHz } from '../physics/recoil.js';
import { decodeNpy, type DecodedNpy } from '../formats/npy.js';
import { decodePng } from '../formats/pngCodec.js';
import { ParameterError } from '../physics/parameterError.js';
import { printable } from './formatScenarioError.js';
import { InputError } from './inputError.js';
import type { LandscapeTerm } from './landscapeSchema.js';
import type { LaboratoryParameters } from './resolveLaboratory.js';
import type { Scenario } from './scenarioSchema.js';
import { internalEnergyPerUnit, type EnergyUnits, type ScenarioEnergyUnit } from './scenarioEnergyUnit.js';

/** Largest landscape file read (a 512^3 float64 lattice is 1 GiB). */
const MAX_FILE_BYTES = 2 ** 30 + 4096;

export interface LandscapeFileRecord {
  /** as written in the scenario */
  path: string;
  /** the file actually read */
  resolvedPath: string;
  bytes: number;
  sha256: string;
  format: 'npy' | 'png';
  /** array shape (.npy) or [height, width] (PNG) */
  shape: number[];
}

export interface LandscapeTermRecord {
  index: number;
  name: string;
  kind: LandscapeTerm['kind'];
  /** smallest and largest site energy of the term, in energyUnit */
  minimum: number;
  maximum: number;
  energyUnit: string;
  file: LandscapeFileRecord | null;
  /** how the term reaches the sites, in words */
  method: string;
  /** superlattice with tunnelling "combined": what the combined-lattice calculation found */
  combined?: {
    axis: number;
    mainDepthEr: number;
    amplitudeEr: number;
    periodSites: number;
    hoppingRelative: { min: number; max: number };
    interactionRelative: { min: number; max: number };
    nextNearestRatioMax: number;
    bandGapMinHz: number;
  };
}

export interface ResolvedLandscape {
  records: LandscapeTermRecord[];
  /** site energies of each term, internal unit, flat C order (same order as records) */
  fields: Float64Array[];
  /** the sum of all terms (internal unit), or null without terms */
  total: Float64Array | null;
  /** per-bond J along each lattice axis where a combined superlattice changes it (else null), internal unit */
  hopping: Array<Float64Array | null> | null;
  /** per-site U where a combined superlattice changes it, internal unit */
  interaction: Float64Array | null;
  warnings: string[];
}

export interface LandscapeInput {
  geometry: LatticeGeometry;
  units: EnergyUnits;
  laboratory: LaboratoryParameters | null;
  /** folder of the scenario file: relative paths start here (default: the working directory) */
  scenarioDirectory?: string;
}

/** Internal energy of one `unit`, refusing a laboratory unit outside laboratory mode (the message names `field`). */
function unitEnergy(unit: ScenarioEnergyUnit, units: EnergyUnits, field: string): number {
  if ((unit === 'Hz' || unit === 'kHz') && units.hertz === null) throw new InputError(`${field}: ${unit} needs laboratory mode`);
  if (unit === 'nK' && units.nanokelvin === null) throw new InputError(`${field}: nK needs laboratory mode`);
  return internalEnergyPerUnit(unit, units);
}

function shortPath(path: string): string {
  const p = printable(path);
  return p.length > 100 ? `${p.slice(0, 45)}...${p.slice(p.length - 52)}` : p;
}

function shapeText(shape: readonly number[]): string {
  return `(${shape.join(', ')}${shape.length === 1 ? ',' : ''})`;
}

interface ReadFile {
  bytes: Uint8Array;
  record: Omit<LandscapeFileRecord, 'format' | 'shape'>;
}

function readTermFile(path: string, field: string, directory: string | undefined): ReadFile {
  const resolvedPath = isAbsolute(path) ? path : resolve(directory ?? process.cwd(), path);
  const shown = shortPath(resolvedPath);
  let size: number;
  try {
    const st = statSync(resolvedPath);
    if (st.isDirectory()) throw new InputError(`${field}: ${shown} is a folder, not a file`);
    if (!st.isFile()) throw new InputError(`${field}: ${shown} is not a regular file`);
    size = st.size;
  } catch (err) {
    if (err instanceof InputError) throw err;
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ENOENT' || code === 'ENOTDIR') {
      throw new InputError(`${field}: file not found: ${shown}${isAbsolute(path) ? '' : ' (paths are relative to the scenario file)'}`);
    }
    throw new InputError(`${field}: cannot read ${shown} (${code ?? 'unknown error'})`);
  }
  if (size > MAX_FILE_BYTES) throw new InputError(`${field}: ${shown} is ${size} bytes, more than the 1 GiB a landscape file may have`);
  if (size === 0) throw new InputError(`${field}: ${shown} is empty`);
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(readFileSync(resolvedPath));
  } catch (err) {
    throw new InputError(`${field}: cannot read ${shown} (${(err as NodeJS.ErrnoException).code ?? 'unknown error'})`);
  }
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  return { bytes, record: { path, resolvedPath, bytes: size, sha256 } };
}

function decodeNpyFile(bytes: Uint8Array, field: string, shown: string): DecodedNpy & { descr: string } {
  let decoded: DecodedNpy;
  try {
    decoded = decodeNpy(bytes);
  } catch (err) {
    throw new InputError(`${field}: ${shown}: ${(err as Error).message}`);
  }
  const header = new TextDecoder('latin1').decode(bytes.subarray(0, Math.min(bytes.length, 4096)));
  const descr = /'descr':\s*'([^']+)'/.exec(header)?.[1] ?? '?';
  if (decoded.shape.some((n) => !Number.isInteger(n) || n < 0)) throw new InputError(`${field}: ${shown}: the .npy header has an invalid shape`);
  return { ...decoded, descr };
}

/** Refuses NaN and infinite values, naming how many and where the first one is. */
function requireFinite(values: Float64Array, shape: readonly number[], field: string, shown: string): void {
  let bad = 0;
  let first = -1;
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) {
      if (first < 0) first = i;
      bad++;
    }
  }
  if (bad === 0) return;
  const index: number[] = [];
  let r = first;
  for (let d = shape.length - 1; d >= 0; d--) {
    index.unshift(r % shape[d]);
    r = Math.floor(r / shape[d]);
  }
  throw new InputError(
    `${field}: ${shown} holds ${bad} value${bad === 1 ? '' : 's'} that ${bad === 1 ? 'is' : 'are'} NaN or infinite (first at index ${shapeText(index)}); ` +
      'replace them with finite energies',
  );
}

function minMax(values: Float64Array): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    if (values[i] < min) min = values[i];
    if (values[i] > max) max = values[i];
  }
  return { min, max };
}

function readPicture(bytes: Uint8Array, path: string, field: string, shown: string): { image: PotentialImage; format: 'npy' | 'png'; shape: number[] } {
  if (path.toLowerCase().endsWith('.png')) {
    let png;
    try {
      png = decodePng(bytes);
    } catch (err) {
      throw new InputError(`${field}: ${shown}: ${(err as Error).message.replace(/^decodePng: /, '')}`);
    }
    if (png.colorType !== 0 && png.colorType !== 4) {
      throw new InputError(`${field}: ${shown} is a colour PNG; save the picture as greyscale (8 or 16 bit) so that each grey level is one energy step`);
    }
    return { image: { values: png.gray, width: png.width, height: png.height }, format: 'png', shape: [png.height, png.width] };
  }
  const npy = decodeNpyFile(bytes, field, shown);
  if (npy.shape.length !== 1 && npy.shape.length !== 2) {
    throw new InputError(`${field}: ${shown} has shape ${shapeText(npy.shape)}; a picture needs a 2D array a[row, col] (or 1D for one row)`);
  }
  const height = npy.shape.length === 2 ? npy.shape[0] : 1;
  const width = npy.shape[npy.shape.length - 1];
  if (width < 1 || height < 1) throw new InputError(`${field}: ${shown} has shape ${shapeText(npy.shape)}: no pixels`);
  requireFinite(npy.data, npy.shape, field, shown);
  return { image: { values: npy.data, width, height }, format: 'npy', shape: npy.shape };
}

/** Site energies and records of every landscape term; see the file header. */
export function resolveLandscape(scenario: Scenario, input: LandscapeInput): ResolvedLandscape {
  const terms = scenario.landscape ?? [];
  const { geometry, units, laboratory } = input;
  const dims = geometry.dims;
  const scenarioUnit: ScenarioEnergyUnit = scenario.energyUnit ?? (scenario.hubbard ? 'J' : 'Hz');
  const perScenarioUnit = unitEnergy(scenarioUnit, units, 'energyUnit');
  const spacingUm = laboratory?.latticeSpacingUm ?? null;
  const records: LandscapeTermRecord[] = [];
  const fields: Float64Array[] = [];
  const warnings: string[] = [];
  const combinedByAxis = new Map<number, Array<{ index: number; wave: ExtraStandingWave }>>();

  terms.forEach((t, index) => {
    const field = `landscape[${index}]`;
    const name = t.name ?? `${t.kind}-${index}`;
    const energy = unitEnergy(t.unit ?? scenarioUnit, units, `${field}.unit`);
    const lengthPerSite = (unit: 'sites' | 'um' | undefined): number[] =>
      unit === 'um' ? Array(dims).fill(spacingUm as number) : Array(dims).fill(1);
    let siteEnergy: Float64Array;
    let file: LandscapeFileRecord | null = null;
    let method: string;
    try {
      switch (t.kind) {
        case 'sites': {
          const read = readTermFile(t.file, `${field}.file`, input.scenarioDirectory);
          const shown = shortPath(t.file);
          const npy = decodeNpyFile(read.bytes, `${field}.file`, shown);
          const want = geometry.shape;
          if (npy.shape.length !== want.length || npy.shape.some((n, d) => n !== want[d])) {
            throw new InputError(
              `${field}.file: ${shown} has shape ${shapeText(npy.shape)}, the lattice ${shapeText(want)}; ` +
                `save one energy per site with shape ${shapeText(want)} (axes x, y, z as in lattice.shape, C order)`,
            );
          }
          requireFinite(npy.data, npy.shape, `${field}.file`, shown);
          siteEnergy = new Float64Array(npy.data.length);
          for (let i = 0; i < siteEnergy.length; i++) siteEnergy[i] = npy.data[i] * energy;
          file = { ...read.record, format: 'npy', shape: npy.shape };
          method = `per-site energies read from the file (dtype ${npy.descr})`;
          break;
        }
        case 'image': {
          const read = readTermFile(t.file, `${field}.file`, input.scenarioDirectory);
          const shown = shortPath(t.file);
          const pic = readPicture(read.bytes, t.file, `${field}.file`, shown);
          const result = imagePotential(geometry, pic.image, {
            pixelSize: t.pixelSize,
            offset: [t.offset[0], t.offset[1]],
            angleRad: (t.angleDeg * Math.PI) / 180,
            lengthPerSite: lengthPerSite(t.lengthUnit),
            scale: (t.energyPerLevel ?? 1) * energy,
            resampling: t.resampling,
          });
          siteEnergy = result.siteEnergy;
          file = { ...read.record, format: pic.format, shape: pic.shape };
          method =
            result.resampling === 'bilinear'
              ? 'bilinear interpolation between pixel centres at each site centre'
              : `mean over each site cell of the picture as uniform square pixels (${result.samplesPerSite.join(' x ')} samples per site)`;
          method += `; ${pic.image.width} x ${pic.image.height} pixels of ${t.pixelSize} ${t.lengthUnit === 'um' ? 'µm' : 'sites'}, column = x, row = y (row 0 at the top)`;
          if (result.sitesCovered < geometry.siteCount) method += `; ${geometry.siteCount - result.sitesCovered} sites lie outside the picture (0 there)`;
          break;
        }
        case 'gradient': {
          const a = spacingUm ?? 1;
          let slopePerSite: number;
          if (t.perSite !== undefined) slopePerSite = t.perSite * energy;
          else if (t.perUm !== undefined) slopePerSite = t.perUm * energy * a;
          else {
            // Force m a on a displacement of one lattice spacing, as energy/h in Hz.
            const hz = ((laboratory as LaboratoryParameters).massKg * (t.accelerationMPerS2 as number) * a * 1e-6) / planckJs;
            slopePerSite = hz * (units.hertz as number);
          }
          const offset = (t.offset ?? Array(dims).fill(0)).map((o) => (t.lengthUnit === 'um' ? o / a : o));
          siteEnergy = gradientPotential(geometry, { direction: t.direction, slope: slopePerSite, offset, lengthPerSite: Array(dims).fill(1) });
          method = `linear tilt of ${slopePerSite / perScenarioUnit} ${scenarioUnit} per site along (${t.direction.join(', ')}), zero at the offset`;
          break;
        }
        case 'box': {
          const shape: BoxShape =
            t.shape === 'disc'
              ? { kind: 'disc', radius: t.radius as number }
              : t.shape === 'ring'
                ? { kind: 'ring', innerRadius: t.innerRadius as number, outerRadius: t.outerRadius as number }
                : {
                    kind: 'rectangle',
                    size: typeof t.size === 'number' ? Array(dims).fill(t.size) : (t.size as number[]).length === 1 ? Array(dims).fill((t.size as number[])[0]) : (t.size as number[]),
                    angleRad: (t.angleDeg * Math.PI) / 180,
                  };
          siteEnergy = boxPotential(geometry, {
            shape,
            wallHeight: t.wallHeight * energy,
            edgeWidth: t.edgeWidth,
            offset: t.offset ?? Array(dims).fill(0),
            lengthPerSite: lengthPerSite(t.lengthUnit),
          });
          method =
            `${t.shape}, wall ${t.wallHeight} ${t.unit ?? scenarioUnit}, ` +
            (t.edgeWidth > 0 ? `edge: sharp mask blurred by a Gaussian of sigma ${t.edgeWidth} ${t.lengthUnit === 'um' ? 'µm' : 'sites'} (erf profile)` : 'sharp edge');
          break;
        }
        case 'superlattice': {
          const axis = 'xyz'.indexOf(t.axis);
          const n = geometry.shape[axis];
          const mainNm = laboratory ? (scenario.laboratory as { wavelengthNm: number }).wavelengthNm : NaN;
          const periodSites = t.periodSites ?? (t.wavelengthNm as number) / mainNm;
          const amplitude =
            t.depth !== undefined ? t.depth * energy : (t.depthEr as number) * recoilEnergyHz((laboratory as LaboratoryParameters).massKg, t.wavelengthNm as number) * (units.hertz as number);
          if (geometry.periodic[axis] && Math.abs(n / periodSites - Math.round(n / periodSites)) > 1e-9) {
            warnings.push(
              `${field} (${name}): ${n} sites along the periodic ${t.axis} axis are not a whole number of periods (${periodSites.toPrecision(6)} sites); the second lattice jumps where the axis wraps`,
            );
          }
          if (t.tunnelling === 'combined') {
            const list = combinedByAxis.get(axis) ?? [];
            const recoil = (laboratory as LaboratoryParameters).hubbard.latticeAxes[axis].recoilHz * (units.hertz as number);
            list.push({ index, wave: { amplitudeEr: amplitude / recoil, periodSites, phaseRad: t.phaseRad } });
            combinedByAxis.set(axis, list);
            siteEnergy = new Float64Array(geometry.siteCount); // filled in below
            method = 'Wannier functions of the combined lattice (finite differences, projected position): J along the axis and U from them; site energies = Wannier on-site energy minus that of the plain lattice';
          } else {
            siteEnergy = alongAxis(geometry, axis, standingWaveProfile(n, { axis, amplitude, periodSites, phaseRad: t.phaseRad }));
            method = `V2 sin^2(pi x / ${periodSites.toPrecision(8)} + ${t.phaseRad}) along ${t.axis}, sampled at the site centres (J and U unchanged)`;
          }
          break;
        }
      }
    } catch (err) {
      if (err instanceof InputError) throw err;
      if (err instanceof ParameterError || err instanceof RangeError) throw new InputError(`${field}: ${err.message}`);
      throw err;
    }
    fields.push(siteEnergy);
    records.push({ index, name, kind: t.kind, minimum: 0, maximum: 0, energyUnit: scenarioUnit, file, method });
  });

  // Combined superlattices: one Wannier calculation per axis with all its combined terms.
  let hopping: Array<Float64Array | null> | null = null;
  let interaction: Float64Array | null = null;
  for (const [axis, list] of combinedByAxis) {
    const lab = laboratory as LaboratoryParameters;
    const hz = units.hertz as number;
    const axisLab = lab.hubbard.latticeAxes[axis];
    const first = list[0].index;
    const field = `landscape[${first}]`;
    let result;
    try {
      result = combinedLatticeAxis({ depthEr: axisLab.depthEr, siteCount: geometry.shape[axis], periodic: geometry.periodic[axis], extra: list.map((c) => c.wave) });
    } catch (err) {
      if (err instanceof ParameterError || err instanceof RangeError) throw new InputError(`${field}: ${err.message}`);
      throw err;
    }
    const n = geometry.shape[axis];
    const bondJ = new Float64Array(n);
    const ratioU = new Float64Array(n);
    const shift = new Float64Array(n);
    // Scaled to the plane-wave J and U of the plain lattice, so that a zero second lattice
    // gives exactly the parameters of laboratory mode (and the discretisation error cancels).
    for (let k = 0; k < n; k++) {
      bondJ[k] = (lab.hoppingHz[axis] * result.hoppingEr[k] * hz) / result.reference.hoppingEr;
      ratioU[k] = result.integralW4PerSite[k] / result.reference.integralW4PerSite;
      shift[k] = result.onsiteShiftEr[k] * axisLab.recoilHz * hz;
    }
    hopping ??= Array(dims).fill(null);
    const open = !geometry.periodic[axis];
    const jRange = minMax(open && n > 1 ? bondJ.subarray(0, n - 1) : bondJ);
    hopping[axis] = alongAxis(geometry, axis, bondJ);
    const uAxis = alongAxis(geometry, axis, ratioU);
    if (!interaction) {
      interaction = new Float64Array(geometry.siteCount).fill(lab.interactionHz * hz);
    }
    for (let i = 0; i < interaction.length; i++) interaction[i] *= uAxis[i];
    fields[first] = alongAxis(geometry, axis, shift);
    const uRange = minMax(ratioU);
    const others = list.slice(1).map((c) => c.index);
    records[first].combined = {
      axis,
      mainDepthEr: axisLab.depthEr,
      amplitudeEr: list[0].wave.amplitudeEr,
      periodSites: list[0].wave.periodSites,
      hoppingRelative: { min: jRange.min / (lab.hoppingHz[axis] * hz), max: jRange.max / (lab.hoppingHz[axis] * hz) },
      interactionRelative: uRange,
      nextNearestRatioMax: result.nextNearestRatioMax,
      bandGapMinHz: result.bandGapMinEr * axisLab.recoilHz,
    };
    if (others.length > 0) {
      records[first].method += `; computed together with landscape[${others.join('], landscape[')}] on the same axis (their on-site energies are included here)`;
      for (const o of others) records[o].method = `combined with landscape[${first}] (one Wannier calculation per axis; see there)`;
    }
    const label = `${field} (${records[first].name})`;
    if (result.nextNearestRatioMax > 0.05) {
      warnings.push(`${label}: next-nearest hopping reaches ${(100 * result.nextNearestRatioMax).toFixed(1)}% of J in the combined lattice; the nearest-neighbour model starts to fail`);
    }
    const maxU = lab.interactionHz * uRange.max;
    const gapHz = result.bandGapMinEr * axisLab.recoilHz;
    if (maxU > 0.1 * gapHz) {
      warnings.push(`${label}: U reaches ${((100 * maxU) / gapHz).toFixed(0)}% of the smallest band gap of the combined lattice (${gapHz.toPrecision(3)} Hz); higher bands mix in`);
    }
  }

  let total: Float64Array | null = null;
  for (let k = 0; k < fields.length; k++) {
    const f = fields[k];
    const { min, max } = minMax(f);
    records[k].minimum = min / perScenarioUnit;
    records[k].maximum = max / perScenarioUnit;
    if (total === null) total = new Float64Array(f);
    else for (let i = 0; i < f.length; i++) total[i] += f[i];
  }
  return { records, fields, total, hopping, interaction, warnings };
}
