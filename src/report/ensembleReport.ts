// The report document of a disorder ensemble: what was averaged and how, the spanning
// fraction with its statistical error, the mean and spread pictures, the histograms,
// phases per realisation, one row per realisation, cautions and the scenario.

import type { KeyValueRow, ReportBlock, ReportDocument, StatusLine } from './reportModel.js';
import { cautionsFor } from './cautions.js';
import { phaseNames, phaseTitles } from '../observables/phaseCodes.js';
import type { EnsembleOutcome } from '../output/ensembleOutputs.js';
import { ensembleHistogramSpecs, histogramForDisplay, ensembleWarnings } from '../output/ensembleOutputs.js';
import type { WrittenImage } from '../output/solveOutputs.js';
import { toolVersion } from '../output/toolVersion.js';
import { NO_SUPERFLOW_RATIO } from '../pipeline/solveStiffness.js';


/** Largest number of realisations listed row by row in the report (all are in realisations.csv). */
const MAX_REPORT_ROWS = 200;

export function buildEnsembleReport(o: EnsembleOutcome, images: WrittenImage[], createdIso: string, provenanceLines: string[]): ReportDocument {
  const s = o.stats;
  const u = o.context.units.interaction;
  const lab = o.context.units.hertz !== null;
  const status: StatusLine[] = [];
  if (s.notConverged.length > 0) {
    status.push({
      level: 'error',
      text: `NOT CONVERGED: ${s.notConverged.length} of ${s.realisations} realisations (${listIndices(s.notConverged)}). Averages include them and must not be trusted.`,
    });
  } else {
    status.push({ level: 'ok', text: `All ${s.realisations} realisations converged.` });
  }
  if (o.total.densityHistogram.overflow > 0) {
    status.push({ level: 'warning', text: `${o.total.densityHistogram.overflow} site densities lie above nmax = ${o.bins.maxAtoms} (nmax was raised automatically) and are outside the histogram.` });
  }
  if (s.realisations < 2) status.push({ level: 'warning', text: 'One realisation: the spread between realisations is not defined and is shown as zero.' });
  for (const w of ensembleWarnings(o)) if (w.code !== 'not-converged') status.push({ level: 'warning', text: `${w.code}: ${w.message}` });

  const spanText = `${s.spanningRealisations} of ${s.realisations}`;
  const ensembleRows: KeyValueRow[] = [
    { label: 'realisations', value: s.realisations },
    { label: 'blocks × block size', value: `${o.plan.blockCount} × ${o.plan.blockSize}`, note: 'fixed grouping of the sums; shards hold whole blocks' },
    { label: 'seeds', value: `${JSON.stringify(`${o.baseSeed}/r`)}, r = 0 … ${s.realisations - 1}`, note: 'disorder.seed + "/" + realisation' },
    { label: 'superfluid spans the cloud', value: s.spanningFraction, note: `${spanText} realisations; binomial standard error ${fmt(s.spanningFractionError)}` },
    { label: 'atoms N (mean ± spread)', value: `${fmt(s.atoms.mean)} ± ${fmt(s.atoms.spread)}` },
    { label: 'condensate fraction (mean ± spread)', value: `${fmt(s.condensateFraction.mean)} ± ${fmt(s.condensateFraction.spread)}` },
    ...(s.superfluidFraction !== null
      ? [
          {
            label: 'superfluid fraction (mean ± spread)',
            value: `${fmt(s.superfluidFraction.mean)} ± ${fmt(s.superfluidFraction.spread)}`,
            note: `phase-twist stiffness beside the condensate fraction; standard error of the mean ${fmt(s.superfluidFraction.standardError)}, largest numerical error ${fmt(s.superfluidFraction.largestNumericalError)}`,
          },
          {
            label: 'condensate without superflow',
            value: `${s.superfluidFraction.noSuperflowRealisations} of ${s.superfluidFraction.realisations}`,
            note: `realisations whose condensate (puddles) carries a superfluid fraction below ${NO_SUPERFLOW_RATIO * 100} % of it: compressible puddles without stiffness are a Bose glass (Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989))`,
          },
        ]
      : []),
    {
      label: 'chemical potential mu (mean ± spread)',
      value: `${fmt(s.mu.mean / u)} ± ${fmt(s.mu.spread / u)}`,
      unit: 'U',
      ...(lab ? { secondValue: `${fmt(s.mu.mean / (o.context.units.hertz as number))} ± ${fmt(s.mu.spread / (o.context.units.hertz as number))}`, secondUnit: 'h·Hz' } : {}),
    },
    { label: 'sweeps per realisation (mean)', value: s.sweeps.mean },
    { label: 'largest nmax needed', value: s.nmaxUsedMax },
    ...provenanceLines.map((line) => ({ label: 'produced by', value: line })),
  ];

  const t = histogramForDisplay(o);
  const histogramFigure = images.find((img) => img.file === 'images/histograms.png');
  const histogramBlocks: ReportBlock[] = histogramFigure
    ? [
        {
          kind: 'figure',
          svg: histogramFigure.svg,
          caption:
            `Left: local density of every non-empty site of every realisation (${t.samples} samples), bins of ${1 / o.bins.binsPerAtom} atoms; peaks at integers are Mott sites. ` +
            'Right: condensate density of the same sites, logarithmic scale (empty bins are not drawn); the first bin holds the sites without condensate (Mott insulator, Bose glass, normal fluid).',
        },
      ]
    : ensembleHistogramSpecs(o).map((spec) => ({ kind: 'histogram' as const, ...spec }));

  const phaseRows = phaseNames.map((name) => [phaseTitles[name], s.sitesPerPhase[name]]);
  const records = o.total.records;
  const realisationRows = records
    .slice(0, MAX_REPORT_ROWS)
    .map((r) => [r.index, r.converged ? 'yes' : 'NO', r.sweeps, r.atoms, r.mu / u, r.superfluidSpans ? 'yes' : 'no', r.superfluidClusters, r.largestClusterSites]);
  const th = o.context.thresholds;

  return {
    title: `tiercake — ${o.scenario.name}: disorder ensemble`,
    subtitle: o.scenario.description ?? `${o.context.shape.length}D lattice, ${s.realisations} disorder realisations`,
    createdIso,
    status,
    sections: [
      { heading: 'Ensemble', blocks: [{ kind: 'keyValueTable', rows: ensembleRows }] },
      {
        heading: 'Pictures',
        blocks: [
          ...images
            .filter((img) => img.file !== 'images/histograms.png')
            .map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })),
          {
            kind: 'paragraph',
            text: `The spread is the sample standard deviation between realisations; the standard error of the mean is spread / √${s.realisations} = spread × ${fmt(1 / Math.sqrt(s.realisations))}.`,
          },
        ],
      },
      { heading: 'Histograms', blocks: histogramBlocks },
      {
        heading: 'Phases',
        blocks: [
          { kind: 'table', caption: 'Mean number of sites per realisation in each phase', columns: [{ header: 'phase' }, { header: 'sites' }], rows: phaseRows },
          {
            kind: 'paragraph',
            text:
              `Labels: Mott insulator of filling k where |n − k| ≤ ${th.integerTolerance} and the condensate fraction |φ|²/n ≤ ${th.condensateFractionMax}` +
              `${s.finiteTemperature ? ` and the thermal fluctuations are suppressed (4 kT dn/dmu ≤ ${th.compressibilityMin})` : ''}; superfluid where |φ|²/n > ${th.condensateFractionMax} ` +
              `(and |φ|² > ${th.condensateMin}); empty where n < ${th.emptyDensityMax}; sites without condensate that are off-integer${s.finiteTemperature ? ' or too compressible' : ''} are labelled ` +
              `${s.finiteTemperature ? 'normal fluid' : 'Bose glass'}. A realisation counts as spanning when a connected superfluid cluster crosses the bulk of the cloud ` +
              `(density at least ${th.bulkDensityFraction} of the peak, eroded by ${th.bulkErosionSites} site${th.bulkErosionSites === 1 ? '' : 's'}) or encloses the trap centre (a ring between shells); the dilute rim does not count.`,
          },
        ],
      },
      {
        heading: 'Realisations',
        blocks: [
          {
            kind: 'table',
            caption: records.length > MAX_REPORT_ROWS ? `First ${MAX_REPORT_ROWS} of ${records.length}; all are in realisations.csv` : 'All realisations (also in realisations.csv)',
            columns: [
              { header: 'realisation' },
              { header: 'converged' },
              { header: 'sweeps' },
              { header: 'atoms' },
              { header: 'mu', unit: 'U' },
              { header: 'spans' },
              { header: 'clusters' },
              { header: 'largest cluster', unit: 'sites' },
            ],
            rows: realisationRows,
          },
        ],
      },
      {
        heading: 'Cautions',
        blocks: [
          {
            kind: 'cautionList',
            items: [
              ...cautionsFor({ depthFromBeamPower: false, finiteTemperature: s.finiteTemperature, showsLocalDensityPlots: false }),
              {
                title: 'Finite ensemble',
                text:
                  `Averages over ${s.realisations} realisations carry a statistical error: spread / √R per site, and √(p(1 − p)/R) = ${fmt(s.spanningFractionError)} for the spanning fraction. ` +
                  'Whether a cluster spans also depends on the size of the cloud, so compare spanning fractions only between clouds of similar size.',
              },
            ],
          },
        ],
      },
      {
        heading: 'Scenario',
        blocks: [{ kind: 'codeBlock', caption: `The scenario as run (defaults filled in, overrides applied); SHA-256 ${o.scenarioHash}`, code: JSON.stringify(o.scenario, null, 2) }],
      },
    ],
    footer: `tiercake ${toolVersion()}`,
  };
}

function listIndices(indices: readonly number[]): string {
  const shown = indices.slice(0, 12).join(', ');
  return indices.length > 12 ? `${shown}, …` : shown;
}

function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return Math.abs(x) >= 1e4 || Math.abs(x) < 1e-3 ? x.toExponential(3) : Number(x.toPrecision(4)).toString();
}
