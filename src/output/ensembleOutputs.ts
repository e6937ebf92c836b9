// Files of a finished ensemble: averaged fields and per-site spread (.npy), the phase
// fractions, histograms (CSV + PNG), one row per realisation (CSV), pictures, summary.json
// and report.html. A single run and a merge of shards call this with the same totals, so
// they write the same files (only `provenance` in summary.json and the report's time
// stamp and provenance lines differ). Writers only: the numbers come from
// src/ensemble/ensembleStatistics.ts.

import { NO_SUPERFLOW_RATIO, STIFFNESS_CRITERION } from '../pipeline/solveStiffness.js';
import { encodeNpy } from '../formats/npy.js';
import { csvTable, type CsvTable } from '../formats/csvTable.js';
import type { OutputFolder } from './outputFolder.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { renderHistogramSvg } from '../figures/histogramSvg.js';
import { sideBySideSvg } from '../figures/composeSvg.js';
import type { HistogramSpec } from '../figures/plotSpec.js';
import { phaseNames, PhaseCode } from '../observables/phaseCodes.js';
import { inAllUnits, outputEnergyUnit } from '../scenario/resolveScenario.js';
import type { EnsembleAccumulation } from '../pipeline/ensemble/blockPartial.js';
import { binEdges } from '../pipeline/ensemble/histogramBins.js';
import type { EnsembleStatistics } from '../pipeline/ensemble/ensembleStatistics.js';
import { centralPlane, figureImage, jsonReplacer, type WrittenImage } from './solveOutputs.js';
import { seedRuleText, type EnsembleIdentity } from './ensembleShard.js';
import { toolVersion } from './toolVersion.js';
import { toolStamp } from './recordFields.js';
import { readingWarnings } from '../observables/readingWarnings.js';

/** Everything the final files are made from. */
export interface EnsembleOutcome extends EnsembleIdentity {
  total: EnsembleAccumulation;
  stats: EnsembleStatistics;
  /** how the result was produced (not part of the reproducible content) */
  provenance: Record<string, unknown>;
}

const axisNames = ['x', 'y', 'z'];

/** .npy files: name -> bytes. */
export function ensembleFieldFiles(o: EnsembleOutcome): Array<{ file: string; bytes: Uint8Array }> {
  const shape = o.context.shape;
  const s = o.stats;
  return [
    { file: 'fields/density_mean.npy', bytes: encodeNpy(s.densityMean, shape) },
    { file: 'fields/density_spread.npy', bytes: encodeNpy(s.densitySpread, shape) },
    { file: 'fields/condensate_mean.npy', bytes: encodeNpy(s.condensateMean, shape) },
    { file: 'fields/condensate_spread.npy', bytes: encodeNpy(s.condensateSpread, shape) },
    { file: 'fields/phase_fraction.npy', bytes: encodeNpy(s.phaseFraction, [phaseNames.length, ...shape]) },
  ];
}

/** Histogram counts and fractions of cloud sites per bin. */
export function histogramTable(o: EnsembleOutcome): { edges: Float64Array; density: Float64Array; condensate: Float64Array; densityFraction: Float64Array; condensateFraction: Float64Array; samples: number } {
  const edges = binEdges(o.bins);
  const d = o.total.densityHistogram;
  const c = o.total.condensateHistogram;
  let samples = d.overflow;
  for (let k = 0; k < d.counts.length; k++) samples += d.counts[k];
  const fraction = (h: Float64Array): Float64Array => Float64Array.from(h, (v) => (samples > 0 ? v / samples : 0));
  return { edges, density: d.counts, condensate: c.counts, densityFraction: fraction(d.counts), condensateFraction: fraction(c.counts), samples };
}

/**
 * The histogram table cut after the last whole atom that holds a count (at least one atom
 * per site), for pictures: bins above nmax's occupied part would only be empty space.
 */
export function histogramForDisplay(o: EnsembleOutcome): ReturnType<typeof histogramTable> {
  const t = histogramTable(o);
  let last = 0;
  for (let k = 0; k < t.density.length; k++) if (t.density[k] > 0 || t.condensate[k] > 0) last = k;
  const atoms = Math.min(o.bins.maxAtoms, Math.max(1, Math.ceil(t.edges[last + 1] - 1e-9)));
  const bins = Math.min(t.density.length, atoms * o.bins.binsPerAtom);
  return {
    edges: t.edges.slice(0, bins + 1),
    density: t.density.slice(0, bins),
    condensate: t.condensate.slice(0, bins),
    densityFraction: t.densityFraction.slice(0, bins),
    condensateFraction: t.condensateFraction.slice(0, bins),
    samples: t.samples,
  };
}

export function histogramsCsv(o: EnsembleOutcome): CsvTable {
  const t = histogramTable(o);
  const bins = t.density.length;
  return csvTable(
    'histograms.csv',
    [
      { name: 'bin_low', values: t.edges.subarray(0, bins), unit: 'atoms per site', description: 'lower edge of the bin (included)' },
      { name: 'bin_high', values: t.edges.subarray(1, bins + 1), unit: 'atoms per site', description: 'upper edge of the bin (excluded; included in the last bin)' },
      { name: 'density_sites', values: t.density, unit: '', datatype: 'integer', description: 'site samples whose local density n_i falls in the bin' },
      { name: 'density_fraction', values: t.densityFraction, unit: '1', description: 'density_sites / all samples' },
      { name: 'condensate_sites', values: t.condensate, unit: '', datatype: 'integer', description: 'site samples whose condensate density |phi_i|^2 falls in the bin' },
      { name: 'condensate_fraction', values: t.condensateFraction, unit: '1', description: 'condensate_sites / all samples' },
    ],
    {
      title: `ensemble histograms of scenario ${o.scenario.name}`,
      description: `Histograms of the local density and the condensate density over ${o.stats.realisations} disorder realisations.`,
      creator: `tiercake ${toolVersion()}`,
      notes: [
        `counted: every non-empty site (n_i >= ${o.context.thresholds.emptyDensityMax}) of every realisation, ${t.samples} samples`,
        `above the range (nmax = ${o.bins.maxAtoms}): ${o.total.densityHistogram.overflow} density and ${o.total.condensateHistogram.overflow} condensate samples, not in any bin`,
      ],
    },
  );
}

export function realisationsCsv(o: EnsembleOutcome): CsvTable {
  const r = o.total.records;
  const u = o.context.units.interaction;
  const phaseColumns = phaseNames.map((name, code) => ({
    name: `sites_${snake(name)}`,
    values: r.map((x) => x.phaseSites[code]),
    unit: '',
    datatype: 'integer' as const,
    description: `sites labelled ${name} in the realisation`,
  }));
  return csvTable(
    'realisations.csv',
    [
      { name: 'realisation', values: r.map((x) => x.index), unit: '', datatype: 'integer', description: `realisation index r (disorder seed "${o.baseSeed}/r")` },
      { name: 'converged', values: r.map((x) => (x.converged ? 1 : 0)), unit: '', datatype: 'integer', description: '1 when the solve converged, 0 when not' },
      { name: 'sweeps', values: r.map((x) => x.sweeps), unit: '', datatype: 'integer', description: 'sweeps of every stage of the solve' },
      { name: 'nmax_used', values: r.map((x) => x.nmaxUsed), unit: 'atoms per site', datatype: 'integer', description: 'highest occupation kept' },
      { name: 'mu_over_U', values: r.map((x) => x.mu / u), unit: '1', description: 'chemical potential over U at the trap centre' },
      { name: 'kT_over_U', values: r.map((x) => x.temperature / u), unit: '1', description: 'k_B T over U at the trap centre' },
      { name: 'atoms', values: r.map((x) => x.atoms), unit: 'atoms', description: 'atom number' },
      { name: 'condensed_atoms', values: r.map((x) => x.condensedAtoms), unit: 'atoms', description: 'sum of |phi_i|^2' },
      {
        name: 'superfluid_spans',
        values: r.map((x) => (x.superfluidSpans ? 1 : 0)),
        unit: '',
        datatype: 'integer',
        description:
          '1 when a superfluid cluster spans the bulk of the cloud (density above phases.bulkDensityFraction of the peak, eroded by phases.bulkErosionSites): ' +
          'it touches opposite faces of the bulk, wraps a periodic axis, or encloses the trap centre; superfluid on the dilute rim does not count',
      },
      { name: 'superfluid_clusters', values: r.map((x) => x.superfluidClusters), unit: '', datatype: 'integer', description: 'connected superfluid clusters in the bulk' },
      { name: 'largest_cluster_sites', values: r.map((x) => x.largestClusterSites), unit: '', datatype: 'integer', description: 'sites of the largest superfluid cluster in the bulk' },
      ...phaseColumns,
      ...(r.every((x) => x.superfluidFraction !== null)
        ? [
            {
              name: 'superfluid_fraction',
              values: r.map((x) => x.superfluidFraction as number),
              unit: '1',
              description: 'superfluid fraction from a phase twist (solver.stiffness), mean over the periodic axes: the stiffness criterion of a Bose glass (zero) against a superfluid (finite)',
            },
            { name: 'superfluid_fraction_error', values: r.map((x) => x.superfluidFractionError as number), unit: '1', description: 'numerical error of the superfluid fraction (two twist sizes), largest over the axes' },
          ]
        : []),
    ],
    {
      title: `ensemble of scenario ${o.scenario.name}: one row per disorder realisation`,
      description: seedRuleText(o.baseSeed),
      creator: `tiercake ${toolVersion()}`,
      notes: ['U = on-site interaction at the trap centre'],
    },
  );
}

function snake(name: string): string {
  return name.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
}

/** The two histograms of an ensemble: local density (linear) and condensate density (log counts). */
export function ensembleHistogramSpecs(o: EnsembleOutcome): [HistogramSpec, HistogramSpec] {
  const t = histogramForDisplay(o);
  const widthPx = 470;
  return [
    {
      title: 'Local density',
      binEdges: t.edges,
      series: [{ label: 'density n', counts: t.densityFraction }],
      xAxis: { label: 'n', unit: 'atoms per site' },
      yAxis: { label: 'fraction of cloud sites' },
      widthPx,
    },
    {
      title: 'Condensate density',
      binEdges: t.edges,
      series: [{ label: 'condensate |phi|²', counts: t.condensateFraction }],
      xAxis: { label: '|phi|²', unit: 'atoms per site' },
      yAxis: { label: 'fraction of cloud sites', log: t.samples > 0 },
      widthPx,
    },
  ];
}

function histogramImage(o: EnsembleOutcome): WrittenImage {
  const title = `${o.scenario.name}: site histograms, ${o.stats.realisations} realisations`;
  const svg = sideBySideSvg(ensembleHistogramSpecs(o).map((spec) => renderHistogramSvg(spec)), title);
  return figureImage('images/histograms.png', 'Histograms of local density and condensate density (cloud sites of all realisations)', svg);
}

export function ensembleImages(o: EnsembleOutcome): WrittenImage[] {
  const { shape, trapCentre: centre, latticeSpacingUm: spacing } = o.context;
  const s = o.stats;
  const name = o.scenario.name;
  const r = s.realisations;
  const siteCount = s.densityMean.length;
  const superfluidFraction = s.phaseFraction.subarray(PhaseCode.superfluid * siteCount, (PhaseCode.superfluid + 1) * siteCount);
  const images: WrittenImage[] = [];
  const unit = spacing !== null ? 'µm' : 'sites';
  const step = spacing ?? 1;
  if (shape.length === 1) {
    const x = Array.from({ length: shape[0] }, (_, i) => (i - centre[0]) * step);
    const svg = renderLinePlotSvg({
      title: `${name}: ensemble of ${r}`,
      xAxis: { label: 'x', unit },
      yAxis: { label: 'atoms per site; fraction' },
      series: [
        { label: 'mean density n', x, y: s.densityMean, yErr: s.densitySpread },
        { label: 'mean condensate |phi|²', x, y: s.condensateMean, yErr: s.condensateSpread },
        { label: 'superfluid fraction', x, y: superfluidFraction, style: { line: 'dashed' } },
      ],
    });
    images.push(figureImage('images/chain_ensemble.png', 'Mean over realisations (error bars: spread between realisations)', svg));
    images.push(histogramImage(o));
    return images;
  }
  const planeLabel = shape.length === 3 ? ` (plane z = ${Math.round(centre[2])})` : '';
  const axis = (d: number) => ({ label: `${axisNames[d]} (${unit})`, origin: -centre[d] * step, step });
  const picture = (field: Float64Array, file: string, title: string, bar: string, colorMap: string, valueRange?: { min: number; max: number }): void => {
    const plane = centralPlane(field, shape, centre);
    const svg = renderFieldMapSvg({
      values: plane.values,
      nx: plane.nx,
      ny: plane.ny,
      title: `${name}: ${title}${planeLabel}`,
      xAxis: axis(0),
      yAxis: axis(1),
      colorBarLabel: bar,
      colorMap,
      ...(valueRange ? { valueRange } : {}),
    });
    images.push(figureImage(`images/${file}.png`, `${title[0].toUpperCase()}${title.slice(1)}${planeLabel}`, svg));
  };
  picture(s.densityMean, 'density_mean', `mean density over ${r} realisations`, 'atoms per site', 'ember');
  picture(s.condensateMean, 'condensate_mean', `mean condensate |phi|² over ${r} realisations`, 'atoms per site', 'glacier');
  picture(s.densitySpread, 'density_spread', 'spread of the density between realisations', 'standard deviation, atoms per site', 'dusk');
  picture(s.condensateSpread, 'condensate_spread', 'spread of the condensate between realisations', 'standard deviation, atoms per site', 'dusk');
  picture(Float64Array.from(superfluidFraction), 'superfluid_fraction', 'fraction of realisations in which a site is superfluid', 'fraction', 'glacier', { min: 0, max: 1 });
  images.push(histogramImage(o));
  return images;
}

/** The machine-readable summary; everything but `provenance` is the same for a run and a merge. */
/**
 * Warnings of an ensemble ({code, message}, as for a solve): realisations that did not
 * converge, and a mean cloud that reaches an open face of a trapped lattice (the faces of an
 * untrapped lattice are walls by design and are not checked).
 */
export function ensembleWarnings(o: EnsembleOutcome): Array<{ code: string; message: string }> {
  const s = o.stats;
  const warnings: Array<{ code: string; message: string }> = [];
  if (s.notConverged.length > 0) {
    const shown = s.notConverged.slice(0, 12).join(', ');
    warnings.push({
      code: 'not-converged',
      message: `${s.notConverged.length} of ${o.plan.realisations} realisations did not converge (indices ${shown}${s.notConverged.length > 12 ? ', ...' : ''}); their fields enter the averages as they stand (raise solver.maxSweeps or loosen solver.tolerance)`,
    });
  }
  const trap = o.scenario.trap as { coefficient?: unknown; frequencyHz?: unknown } | undefined;
  if (trap !== undefined && (trap.coefficient !== undefined || trap.frequencyHz !== undefined)) {
    const edge = readingWarnings({
      shape: o.context.shape,
      periodic: o.context.periodic,
      density: s.densityMean,
      atoms: s.atoms.mean,
      convergence: { converged: true, stopped: false, residual: 0, tolerance: 1, sweeps: 0, muSearchConverged: null, temperatureSearchConverged: null },
      truncation: { nmax: 0, maxTopWeight: 0, topWeightMax: 1 },
    }).filter((w) => w.code === 'cloud-at-edge' || w.code === 'empty-cloud');
    for (const w of edge) warnings.push({ code: w.code, message: `mean over realisations: ${w.message}` });
  }
  const fs = s.superfluidFraction;
  if (fs !== null && fs.notConverged.length > 0) {
    warnings.push({
      code: 'stiffness-not-converged',
      message: `the twist curvature did not converge in ${fs.notConverged.length} of ${fs.realisations} realisations (indices ${fs.notConverged.slice(0, 12).join(', ')}${fs.notConverged.length > 12 ? ', ...' : ''}); their superfluid fractions enter the mean as they stand (raise solver.maxSweeps)`,
    });
  }
  if (fs !== null && fs.noSuperflowRealisations > 0) {
    warnings.push({
      code: 'no-superflow',
      message:
        `in ${fs.noSuperflowRealisations} of ${fs.realisations} realisations the condensate carries no superflow (superfluid fraction below ${NO_SUPERFLOW_RATIO} of the condensate fraction): ` +
        'the sites labelled superfluid there are puddles; where they are compressible this is a Bose glass by the stiffness criterion',
    });
  }
  return warnings;
}

export function buildEnsembleSummary(o: EnsembleOutcome, files: string[]): Record<string, unknown> {
  const s = o.stats;
  const units = o.context.units;
  const energy = (x: number): Record<string, number> => inAllUnits(x, units);
  const t = histogramTable(o);
  return {
    tool: toolStamp(),
    kind: 'disorder ensemble',
    warnings: ensembleWarnings(o),
    scenario: o.scenario,
    scenarioHash: o.scenarioHash,
    ensemble: {
      realisations: o.plan.realisations,
      blockSize: o.plan.blockSize,
      blocks: o.plan.blockCount,
      baseSeed: o.baseSeed,
      seedRule: seedRuleText(o.baseSeed),
    },
    energyUnit: outputEnergyUnit(o.scenario, units).name,
    energyUnitNote: 'the scenario\'s energy unit; energy blocks give each value in every available unit: J (hopping), U (interaction at the trap centre), and Hz, kHz, nK in laboratory mode',
    lattice: {
      shape: o.context.shape,
      periodic: o.context.periodic,
      sites: s.densityMean.length,
      latticeSpacingUm: o.context.latticeSpacingUm,
      trapCentreSites: o.context.trapCentre,
    },
    results: {
      superfluidSpanningFraction: s.spanningFraction,
      superfluidSpanningFractionError: s.spanningFractionError,
      superfluidSpanningRealisations: s.spanningRealisations,
      convergedRealisations: s.convergedRealisations,
      notConvergedRealisations: s.notConverged,
      atoms: s.atoms,
      condensedAtoms: s.condensedAtoms,
      condensateFraction: s.condensateFraction,
      chemicalPotential: { mean: energy(s.mu.mean), spread: energy(s.mu.spread) },
      sweeps: s.sweeps,
      meanSitesPerPhase: s.sitesPerPhase,
      nmaxUsedMax: s.nmaxUsedMax,
      ...(s.superfluidFraction !== null ? { superfluidFraction: { ...s.superfluidFraction, criterion: STIFFNESS_CRITERION } } : {}),
    },
    phases: {
      thresholds: o.context.thresholds,
      compressibleWithoutCondensate: s.finiteTemperature ? 'normalFluid' : 'boseGlass',
      phaseFractionAxis0: phaseNames,
    },
    histograms: {
      binsPerAtom: o.bins.binsPerAtom,
      rangeAtomsPerSite: [0, o.bins.maxAtoms],
      samples: t.samples,
      counted: 'every non-empty site of every realisation',
      densityOverflow: o.total.densityHistogram.overflow,
      condensateOverflow: o.total.condensateHistogram.overflow,
    },
    fieldsNote:
      'fields/*_mean.npy: mean over realisations; fields/*_spread.npy: sample standard deviation between realisations ' +
      '(standard error of the mean = spread / sqrt(realisations)); fields/phase_fraction.npy: axis 0 = phase code ' +
      `(${phaseNames.map((n, k) => `${k} ${n}`).join(', ')}), value = fraction of realisations with that phase at the site`,
    files,
    provenance: o.provenance,
  };
}

/** Stage every file of a finished ensemble in `folder` (the caller commits it). */
export function writeEnsembleFiles(o: EnsembleOutcome, folder: OutputFolder, reportHtml: (images: WrittenImage[]) => string): string[] {
  const files: string[] = [];
  for (const f of ensembleFieldFiles(o)) {
    folder.write(f.file, f.bytes);
    files.push(f.file);
  }
  for (const table of [histogramsCsv(o), realisationsCsv(o)]) {
    folder.write(table.file, table.csv);
    folder.write(table.metadataFile, table.metadata);
    files.push(table.file, table.metadataFile);
  }
  const images = ensembleImages(o);
  for (const img of images) {
    folder.write(img.file, img.png);
    files.push(img.file);
  }
  files.push('summary.json', 'report.html');
  folder.write('summary.json', `${JSON.stringify(buildEnsembleSummary(o, files), jsonReplacer, 2)}\n`);
  folder.write('report.html', reportHtml(images));
  return files;
}
