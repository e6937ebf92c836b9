// Files of a `solve` run: summary.json, fields/*.npy, profiles.csv, images/*.png and
// report.html, all staged in an OutputFolder and committed together. Writers take the
// plain results of src/pipeline/solveScenario.ts and compute no physics.

import { encodeNpy } from '../formats/npy.js';
import { toCsv } from '../formats/csv.js';
import type { OutputFolder } from './outputFolder.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { renderPhaseMapSvg } from '../figures/phaseMapSvg.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { columnDensity } from '../imaging/columnDensity.js';
import { inAllUnits } from '../scenario/resolveScenario.js';
import { phaseNames } from '../observables/phaseCodes.js';
import type { SolveArtifacts } from '../pipeline/solveScenario.js';
import { toolVersion } from './toolVersion.js';
import type { CameraPictureFiles } from './cameraOutputs.js';

export interface WrittenImage {
  file: string;
  title: string;
  png: Uint8Array;
  /** The figure the PNG was rendered from (the report inlines it). */
  svg: string;
}

/** A figure as an image file: the SVG and the PNG rendered from it. */
export function figureImage(file: string, title: string, svg: string): WrittenImage {
  return { file, title, svg, png: svgToPng(svg) };
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

function energyBlock(value: number, a: SolveArtifacts): Record<string, number> {
  return inAllUnits(value, a.resolved.units);
}

/** The machine-readable summary (inputs echoed, results, convergence, timings). */
export function buildSummary(a: SolveArtifacts, files: string[], imaging?: Record<string, unknown>): Record<string, unknown> {
  const { outcome, resolved, classification, shells } = a;
  const totals = outcome.solve.totals;
  const relax = outcome.solve.relax;
  const temperature = outcome.temperature;
  const atoms = totals.atoms;
  const spacing = resolved.latticeSpacingUm;
  return {
    tool: { name: 'tiercake', version: toolVersion() },
    scenario: a.scenario,
    mode: resolved.mode,
    energyUnit: resolved.units.internal,
    energyUnitNote:
      'Energies below are given in every available unit: J (nearest-neighbour hopping), U (on-site interaction at the trap centre)' +
      (resolved.units.hertz !== null ? ', Hz (energy/h) and nK (energy/k_B)' : ''),
    lattice: {
      shape: resolved.geometry.shape,
      periodic: resolved.geometry.periodic,
      sites: resolved.geometry.siteCount,
      coordination: resolved.geometry.coordination,
      latticeSpacingUm: spacing,
      trapCentreSites: resolved.trapCentre,
      trapCoefficientPerSite2: resolved.trapCoefficient.map((k) => energyBlock(k, a)),
    },
    laboratory: resolved.laboratory,
    parameters: {
      hopping: energyBlock(resolved.units.hopping, a),
      interaction: energyBlock(resolved.units.interaction, a),
      interactionOverHopping: resolved.units.interaction / resolved.units.hopping,
      chemicalPotential: energyBlock(outcome.solve.mu, a),
      kT: energyBlock(temperature, a),
      nmaxUsed: outcome.truncation.nmaxUsed,
    },
    results: {
      atoms,
      condensedAtoms: totals.condensedAtoms,
      condensateFraction: atoms > 0 ? totals.condensedAtoms / atoms : 0,
      [temperature > 0 ? 'freeEnergy' : 'energy']: energyBlock(totals.freeEnergy, a),
      grandPotential: energyBlock(totals.grandPotential, a),
      entropy: totals.entropy,
      entropyPerAtom: atoms > 0 ? totals.entropy / atoms : 0,
      temperatureSearch: outcome.temperatureSearch,
    },
    convergence: {
      converged: outcome.converged,
      stopped: outcome.stopped,
      sweeps: relax.sweeps,
      totalSweeps: outcome.totalSweeps,
      residual: relax.residual,
      errorEstimate: relax.errorEstimate,
      contractionRate: relax.contractionRate,
      extrapolations: relax.extrapolations,
      tolerance: a.scenario.solver.tolerance,
      chemicalPotentialSearch: outcome.solve.muSearch,
      residualHistory: outcome.solve.residualHistory,
    },
    truncation: outcome.truncation,
    phases: {
      thresholds: classification.thresholds,
      compressibleWithoutCondensate: classification.compressibleWithoutCondensate,
      sitesPerPhase: classification.counts,
      atomsPerPhase: Object.fromEntries(phaseNames.map((n) => [n, shells.byPhase[n].atoms])),
      mottSitesByFilling: classification.mottSitesByFilling,
      superfluidClusters: classification.clusters.count,
      largestSuperfluidCluster: classification.clusters.largestSize,
      superfluidSpans: classification.superfluidSpans,
      superfluidPuddleSites: classification.superfluidPuddleSites,
    },
    shells: shells.shells.map((s) => ({
      ...s,
      innerRadiusUm: spacing !== null ? s.innerRadius * spacing : null,
      outerRadiusUm: spacing !== null ? s.outerRadius * spacing : null,
    })),
    ...(imaging !== undefined ? { imaging } : {}),
    threads: a.threadsUsed,
    timings: a.timings,
    files,
  };
}

export function profilesCsv(a: SolveArtifacts): string {
  const p = a.profile;
  const spacing = a.resolved.latticeSpacingUm;
  const f = p.fields;
  const columns = [
    { name: 'radius_sites', values: p.meanRadius },
    ...(spacing !== null ? [{ name: 'radius_um', values: Array.from(p.meanRadius, (r) => r * spacing) }] : []),
    { name: 'bin_inner_sites', values: p.binInner },
    { name: 'sites', values: p.count },
    { name: 'density_mean', values: f.density.mean },
    { name: 'density_std', values: f.density.std },
    { name: 'condensate_mean', values: f.condensateDensity.mean },
    { name: 'condensate_std', values: f.condensateDensity.std },
    { name: 'variance_mean', values: f.numberVariance.mean },
    { name: 'variance_std', values: f.numberVariance.std },
    { name: 'entropy_mean', values: f.entropy.mean },
    { name: 'parity_odd_mean', values: f.parityOdd.mean },
    { name: `local_mu_${a.resolved.units.internal}`, values: p.localChemicalPotential ?? new Float64Array(p.count.length) },
  ];
  return toCsv(columns, [
    `tiercake ${toolVersion()} radial profile of scenario ${a.scenario.name}`,
    `radius: trap-scaled distance from the trap centre (sites${spacing !== null ? '; radius_um in micrometres' : ''}); bins of ${a.scenario.profiles.binWidthSites} sites`,
    `per bin: mean and standard deviation over the sites in the bin; local_mu = mu - eps(r) in units of ${a.resolved.units.internal}`,
  ]);
}

/** npy files: name -> bytes. */
export function fieldFiles(a: SolveArtifacts): Array<{ file: string; bytes: Uint8Array }> {
  const shape = a.resolved.geometry.shape;
  const f = a.fields;
  const c = a.classification;
  const list: Array<[string, Float64Array | Int32Array | Uint8Array]> = [
    ['density', f.density],
    ['order_parameter', f.orderParameter],
    ['condensate_density', f.condensateDensity],
    ['number_variance', f.numberVariance],
    ['parity_odd', f.parityOdd],
    ['entropy', f.entropy],
    ['site_potential', f.sitePotential],
    ['compressibility', f.compressibility],
    ['phase', c.codes],
    ['mott_filling', c.mottFilling],
  ];
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
    images.push(figureImage('images/chain_profile.png', 'Site-by-site profile of the chain', svg));
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
    );
  const density = centralPlane(a.fields.density, shape, centre);
  images.push(fieldPicture('images/density_plane.png', `Density n_i${planeLabel}`, density, `${name}: density${planeLabel}`, 'atoms per site'));
  const condensate = centralPlane(a.fields.condensateDensity, shape, centre);
  images.push(
    fieldPicture('images/condensate_plane.png', `Condensate density |phi_i|^2${planeLabel}`, condensate, `${name}: condensate |phi|²${planeLabel}`, 'atoms per site', 'glacier'),
  );
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
  images.push(figureImage('images/phase_plane.png', `Phase of each site${planeLabel}`, phaseSvg));
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
): string[] {
  const files: string[] = [];
  for (const f of fieldFiles(a)) {
    folder.write(f.file, f.bytes);
    files.push(f.file);
  }
  folder.write('profiles.csv', profilesCsv(a));
  files.push('profiles.csv');
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
  images.push(...camera.images);
  files.push('summary.json', 'report.html');
  folder.write('summary.json', `${JSON.stringify(buildSummary(a, files, camera.summary), jsonReplacer, 2)}\n`);
  folder.write('report.html', reportHtml(images, camera.summary));
  return files;
}

/** JSON cannot hold NaN or Infinity: write them as null. Typed arrays become lists. */
export function jsonReplacer(_key: string, value: unknown): unknown {
  if (typeof value === 'number' && !Number.isFinite(value)) return null;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return Array.from(value as unknown as ArrayLike<number>);
  return value;
}
