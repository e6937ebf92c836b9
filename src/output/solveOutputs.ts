// Files of a `solve` run: summary.json, fields/*.npy, profiles.csv, images/*.png and
// report.html, all staged in an OutputFolder and committed together. Writers take the
// plain results of src/pipeline/solveScenario.ts and compute no physics.

import { radialFrame } from '../observables/radialFrame.js';
import { encodeNpy } from '../formats/npy.js';
import { csvTable, type CsvColumnSpec, type CsvTable } from '../formats/csvTable.js';
import type { OutputFolder } from './outputFolder.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { renderPhaseMapSvg } from '../figures/phaseMapSvg.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { columnDensity } from '../imaging/columnDensity.js';
import { outputEnergyUnit } from '../scenario/resolveScenario.js';
import type { SolveArtifacts } from '../pipeline/solveScenario.js';
import type { RunWarning } from '../pipeline/runWarnings.js';
import { toolVersion } from './toolVersion.js';
import type { CameraPictureFiles } from './cameraOutputs.js';
import { buildSummary } from './solveSummary.js';
import type { ImageEntry } from './fieldIndex.js';

export interface WrittenImage {
  file: string;
  title: string;
  /** unit of the colour scale (for the images index of summary.json) */
  unit?: string;
  png: Uint8Array;
  /** The figure the PNG was rendered from (the report inlines it). */
  svg: string;
}

/** A figure as an image file: the SVG and the PNG rendered from it. */
export function figureImage(file: string, title: string, svg: string, unit?: string): WrittenImage {
  return { file, title, svg, png: svgToPng(svg), ...(unit !== undefined ? { unit } : {}) };
}

/** A 2D slice or projection of a lattice field, for pictures. */
interface Planar {
  values: Float64Array;
  nx: number;
  ny: number;
  /** physical axes shown (x then y) */
  axes: [number, number];
}

/** The plane through the trap centre perpendicular to the last axis (3D), or the field itself. */
export function centralPlane(field: ArrayLike<number>, shape: readonly number[], centre: readonly number[]): Planar {
  if (shape.length === 2) return { values: Float64Array.from(field), nx: shape[0], ny: shape[1], axes: [0, 1] };
  if (shape.length === 1) return { values: Float64Array.from(field), nx: shape[0], ny: 1, axes: [0, 0] };
  const [nx, ny, nz] = shape;
  const z = Math.min(nz - 1, Math.max(0, Math.round(centre[2])));
  const out = new Float64Array(nx * ny);
  for (let x = 0; x < nx; x++) for (let y = 0; y < ny; y++) out[x * ny + y] = field[(x * ny + y) * nz + z];
  return { values: out, nx, ny, axes: [0, 1] };
}

const axisNames = ['x', 'y', 'z'];

export { buildSummary } from './solveSummary.js';

/**
 * profiles.csv and its CSV-on-the-Web metadata (csvTable.ts): the same columns, names and
 * units in every mode; a column a mode cannot fill (micrometres and Hz in dimensionless
 * mode) holds nan there.
 */
export function profilesCsv(a: SolveArtifacts): CsvTable {
  const p = a.profile;
  const spacing = a.resolved.latticeSpacingUm;
  const units = a.resolved.units;
  const f = p.fields;
  const bins = p.count.length;
  const missing = new Float64Array(bins).fill(Number.NaN);
  const localMu = p.localChemicalPotential ?? missing;
  const scaled = (values: ArrayLike<number>, factor: number | null): Float64Array =>
    factor === null ? missing : Float64Array.from(values, (v) => v * factor);
  // Without a trap the radius is the plain distance from the lattice centre (radialFrame.ts).
  const trapped = radialFrame(a.resolved.trapCoefficient, a.resolved.geometry.periodic) === 'trap';
  const radiusText = trapped ? 'trap-scaled radius' : 'distance from the lattice centre (no trap)';
  const columns: CsvColumnSpec[] = [
    { name: 'radius_sites', values: p.meanRadius, unit: 'lattice spacings', description: trapped ? 'mean trap-scaled distance from the trap centre of the sites in the bin' : 'mean distance from the lattice centre of the sites in the bin (no trap)' },
    { name: 'radius_um', values: scaled(p.meanRadius, spacing), unit: 'um', description: 'the same in micrometres (laboratory mode; nan in dimensionless mode)' },
    { name: 'bin_inner_sites', values: p.binInner, unit: 'lattice spacings', description: `inner edge of the annular bin (${radiusText})` },
    { name: 'sites', values: p.count, unit: '', datatype: 'integer', description: 'sites in the bin' },
    { name: 'density_mean', values: f.density.mean, unit: 'atoms per site', description: 'mean density n over the bin' },
    { name: 'density_std', values: f.density.std, unit: 'atoms per site', description: 'standard deviation of n over the sites of the bin' },
    { name: 'condensate_mean', values: f.condensateDensity.mean, unit: 'atoms per site', description: 'mean condensate density |phi|^2 over the bin' },
    { name: 'condensate_std', values: f.condensateDensity.std, unit: 'atoms per site', description: 'standard deviation of |phi|^2 over the bin' },
    { name: 'variance_mean', values: f.numberVariance.mean, unit: 'atoms^2 per site', description: 'mean on-site number variance <n^2> - <n>^2' },
    { name: 'variance_std', values: f.numberVariance.std, unit: 'atoms^2 per site', description: 'standard deviation of the number variance over the bin' },
    { name: 'entropy_mean', values: f.entropy.mean, unit: 'k_B per site', description: 'mean site entropy' },
    { name: 'parity_odd_mean', values: f.parityOdd.mean, unit: '1', description: 'mean probability of an odd occupation (what a parity-projected image shows)' },
    { name: 'local_mu_over_U', values: scaled(localMu, 1 / units.interaction), unit: '1', description: 'local chemical potential mu - eps(r) over the interaction U at the trap centre' },
    {
      name: 'local_mu_hz',
      values: units.hertz !== null ? scaled(localMu, 1 / units.hertz) : missing,
      unit: 'Hz',
      description: 'local chemical potential mu - eps(r) as energy/h (laboratory mode; nan in dimensionless mode)',
    },
  ];
  return csvTable('profiles.csv', columns, {
    title: `radial profiles of scenario ${a.scenario.name}`,
    description:
      `Radial profiles in annular bins of the ${radiusText} (${a.scenario.profiles.binWidthSites} sites wide)${trapped ? ' about the trap centre' : ''}: ` +
      'per bin, the mean and standard deviation over the sites in it; empty bins hold nan.',
    creator: `tiercake ${toolVersion()}`,
    notes: [trapped ? 'trap-scaled radius: sqrt(sum_d s_d^2 (x_d - c_d)^2) with s_d = sqrt(k_d / k_x), so the trap is round in these units' : 'no trap: the radius is sqrt(sum_d (x_d - c_d)^2) about the lattice centre c'],
  });
}

/**
 * npy files: name -> bytes, in the lattice's axis order (fieldIndex.ts). Energies in the
 * run's energy unit (the scenario's): site_potential in it, compressibility per it.
 */
export function fieldFiles(a: SolveArtifacts): Array<{ file: string; bytes: Uint8Array }> {
  const shape = a.resolved.geometry.shape;
  const f = a.fields;
  const c = a.classification;
  const perUnit = outputEnergyUnit(a.scenario, a.resolved.units).internalPerUnit;
  const list: Array<[string, Float64Array | Int32Array | Uint8Array]> = [
    ['density', f.density],
    ['order_parameter', f.orderParameter],
    ['condensate_density', f.condensateDensity],
    ['number_variance', f.numberVariance],
    ['parity_odd', f.parityOdd],
    ['entropy', f.entropy],
    ['site_potential', perUnit === 1 ? f.sitePotential : f.sitePotential.map((v) => v / perUnit)],
    ['compressibility', perUnit === 1 ? f.compressibility : f.compressibility.map((v) => v * perUnit)],
    ['phase', c.codes],
    ['mott_filling', c.mottFilling],
    ...(c.localDensity !== undefined
      ? ([
          ['lda_phase', c.localDensity.codes],
          ['lda_mott_filling', c.localDensity.mottFilling],
        ] as Array<[string, Uint8Array | Int32Array]>)
      : []),
  ];
  for (const x of a.stiffness?.axes ?? []) if (x.localFraction !== null) list.push([`superfluid_fraction_${'xyz'[x.axis]}`, x.localFraction]);
  if (a.cluster !== null) {
    a.cluster.bondCorrelation.forEach((b, d) => list.push([`bond_correlation_${'xyz'[d]}`, b], [`bond_exact_${'xyz'[d]}`, a.cluster!.bondExact[d]]));
  }
  return list.map(([name, data]) => ({ file: `fields/${name}.npy`, bytes: encodeNpy(data, shape) }));
}

export function solveImages(a: SolveArtifacts): WrittenImage[] {
  const shape = a.resolved.geometry.shape;
  const centre = a.resolved.trapCentre;
  const dims = shape.length;
  const spacing = a.resolved.latticeSpacingUm;
  const images: WrittenImage[] = [];
  const name = a.scenario.name;
  const unitNote = spacing !== null ? 'µm' : 'sites';
  const step = spacing ?? 1;
  const axisFor = (axis: number, originSite: number) => ({
    label: `${axisNames[axis]} (${unitNote})`,
    origin: (0 - originSite) * step,
    step,
  });

  if (dims === 1) {
    const x = Array.from({ length: shape[0] }, (_, i) => (i - centre[0]) * step);
    const svg = renderLinePlotSvg({
      title: `${name}: site profile`,
      xAxis: { label: 'x', unit: unitNote },
      yAxis: { label: 'atoms per site' },
      series: [
        { label: 'density n', x, y: a.fields.density },
        { label: 'condensate |phi|²', x, y: a.fields.condensateDensity },
        { label: 'number variance', x, y: a.fields.numberVariance, style: { line: 'dashed' } },
      ],
    });
    images.push(figureImage('images/chain_profile.png', 'Site-by-site profile of the chain', svg, 'atoms per site'));
    return images;
  }

  const planeLabel = dims === 3 ? ` (plane z = ${Math.round(centre[2])})` : '';
  const xAxis = axisFor(0, centre[0]);
  const yAxis = axisFor(1, centre[1]);
  const scaleBar = spacing !== null ? scaleBarFor(shape[0] * spacing) : undefined;
  const fieldPicture = (file: string, caption: string, plane: Planar, title: string, bar: string, colorMap?: string): WrittenImage =>
    figureImage(
      file,
      caption,
      renderFieldMapSvg({
        values: plane.values,
        nx: plane.nx,
        ny: plane.ny,
        title,
        xAxis,
        yAxis,
        colorBarLabel: bar,
        ...(colorMap ? { colorMap } : {}),
        ...(scaleBar ? { scaleBar } : {}),
      }),
      bar,
    );
  const density = centralPlane(a.fields.density, shape, centre);
  images.push(fieldPicture('images/density_plane.png', `Density n_i${planeLabel}`, density, `${name}: density${planeLabel}`, 'atoms per site'));
  const condensate = centralPlane(a.fields.condensateDensity, shape, centre);
  images.push(
    fieldPicture('images/condensate_plane.png', `Condensate density |phi_i|^2${planeLabel}`, condensate, `${name}: condensate |phi|²${planeLabel}`, 'atoms per site', 'glacier'),
  );
  // solver.stiffness: where the superflow runs (the local superfluid fraction of each bond)
  for (const x of a.stiffness?.axes ?? []) {
    if (x.localFraction === null) continue;
    const n = axisNames[x.axis];
    images.push(
      fieldPicture(
        `images/superfluid_fraction_${n}_plane.png`,
        `Local superfluid fraction of the bonds along ${n}${planeLabel}: each bond's share of the twist curvature over the mean J (n_i + n_j), at its lower site (the map's mean is the superfluid fraction); ~0 on puddles that hold a condensate but carry no superflow`,
        centralPlane(x.localFraction, shape, centre),
        `${name}: superflow along ${n}${planeLabel}`,
        'local superfluid fraction',
        'glacier',
      ),
    );
  }
  const phase = centralPlane(a.classification.codes, shape, centre);
  const filling = centralPlane(a.classification.mottFilling, shape, centre);
  const phaseSvg = renderPhaseMapSvg({
    phase: phase.values,
    filling: filling.values,
    nx: phase.nx,
    ny: phase.ny,
    title: `${name}: phases${planeLabel}`,
    xAxis,
    yAxis,
    ...(scaleBar ? { scaleBar } : {}),
  });
  images.push(figureImage('images/phase_plane.png', `Phase of each site${planeLabel}`, phaseSvg, 'phase label (legend in the figure)'));
  const parity = centralPlane(a.fields.parityOdd, shape, centre);
  images.push(
    fieldPicture('images/parity_plane.png', `Parity-projected occupation P_odd${planeLabel}`, parity, `${name}: parity-projected P(odd)${planeLabel}`, 'probability'),
  );
  if (dims === 3) {
    for (const [field, label, file] of [
      [a.fields.density, 'density', 'density_column'],
      [a.fields.condensateDensity, 'condensate', 'condensate_column'],
    ] as const) {
      const column = columnDensity(field, shape, 2);
      images.push(
        fieldPicture(
          `images/${file}.png`,
          `Column ${label} summed along z`,
          { values: column.values, nx: column.nx, ny: column.ny, axes: [0, 1] },
          `${name}: column ${label} (sum along z)`,
          'atoms per column',
          label === 'condensate' ? 'glacier' : undefined,
        ),
      );
    }
  }
  return images;
}

function scaleBarFor(extentUm: number): { length: number; label: string } {
  const target = extentUm / 5;
  const candidates = [1, 2, 5, 10, 20, 50, 100, 200, 500];
  let best = candidates[0];
  for (const c of candidates) if (c <= target) best = c;
  return { length: best, label: `${best} µm` };
}

/** Stage every file of a solve run in `folder` (the caller commits it). */
export function writeSolveFiles(
  a: SolveArtifacts,
  camera: CameraPictureFiles,
  folder: OutputFolder,
  reportHtml: (images: WrittenImage[], imaging: Record<string, unknown>) => string,
  warnings: readonly RunWarning[] = a.readingWarnings,
): string[] {
  const files: string[] = [];
  for (const f of fieldFiles(a)) {
    folder.write(f.file, f.bytes);
    files.push(f.file);
  }
  const profiles = profilesCsv(a);
  folder.write('profiles.csv', profiles.csv);
  folder.write(profiles.metadataFile, profiles.metadata);
  files.push('profiles.csv', profiles.metadataFile);
  const images = solveImages(a);
  for (const img of images) {
    folder.write(img.file, img.png);
    files.push(img.file);
  }
  // Camera pictures (in situ, parity, time of flight): .npy + 16-bit PNG + sidecar + colour PNG.
  for (const f of camera.arrays) {
    folder.write(f.file, f.bytes);
    files.push(f.file);
  }
  for (const t of camera.texts) {
    folder.write(t.file, t.text);
    files.push(t.file);
  }
  for (const img of camera.images) {
    folder.write(img.file, img.png);
    files.push(img.file);
  }
  const imageIndex: ImageEntry[] = [
    ...images.map((img) => ({ file: img.file, meaning: img.title, unit: img.unit ?? 'see the colour bar' })),
    ...camera.index,
  ];
  images.push(...camera.images);
  files.push('summary.json', 'report.html');
  const summary = buildSummary(a, files, { imaging: camera.summary, warnings, images: imageIndex });
  folder.write('summary.json', `${JSON.stringify(summary, jsonReplacer, 2)}\n`);
  folder.write('report.html', reportHtml(images, camera.summary));
  return files;
}

/** JSON cannot hold NaN or Infinity: write them as null. Typed arrays become lists. */
export function jsonReplacer(_key: string, value: unknown): unknown {
  if (typeof value === 'number' && !Number.isFinite(value)) return null;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return Array.from(value as unknown as ArrayLike<number>);
  return value;
}
