// The report document of a `solve` run: the reading warnings on top, parameters in both
// unit systems, convergence, the pictures, profiles as inline plots, the shells and phases
// with the rules that made them (phaseReport.ts) and the cautions.

import type { ReportBlock, ReportDocument, StatusLine, KeyValueRow } from './reportModel.js';
import { cautionsFor } from './cautions.js';
import { inAllUnits } from '../scenario/resolveScenario.js';
import { fractionOfAtoms } from '../observables/readingWarnings.js';
import type { RunWarning } from '../pipeline/runWarnings.js';
import { radialFrame, radiusLabel } from '../observables/radialFrame.js';
import { phaseReportBlocks, warningStatusLines } from './phaseReport.js';
import type { SolveArtifacts } from '../pipeline/solveScenario.js';
import type { WrittenImage } from '../output/solveOutputs.js';
import { toolVersion } from '../output/toolVersion.js';


function energyRow(label: string, value: number, a: SolveArtifacts, note?: string): KeyValueRow {
  const all = inAllUnits(value, a.resolved.units);
  const lab = a.resolved.units.hertz !== null;
  return {
    label,
    value: lab ? all.Hz : all.J,
    unit: lab ? 'h·Hz' : 'J',
    secondValue: all.U,
    secondUnit: 'U',
    ...(note ? { note } : {}),
  };
}

export function buildSolveReport(
  a: SolveArtifacts,
  images: WrittenImage[],
  createdIso: string,
  imaging: Record<string, unknown> = {},
  /** every warning of the run (pipeline/runWarnings.ts), shown as banners at the top */
  warnings: readonly RunWarning[] = a.readingWarnings,
): ReportDocument {
  const { outcome, resolved, scenario, classification, shells, profile } = a;
  const totals = outcome.solve.totals;
  const relax = outcome.solve.relax;
  const spacing = resolved.latticeSpacingUm;
  const status: StatusLine[] = [];
  if (!outcome.converged) {
    const why = outcome.stopped
      ? 'interrupted before convergence'
      : !outcome.truncation.ok
        ? `truncation weight ${outcome.truncation.maxTopWeight.toExponential(2)} exceeds ${scenario.truncation.topWeightMax}`
        : `max |delta phi| = ${relax.residual.toExponential(2)} after ${outcome.totalSweeps} sweeps (tolerance ${scenario.solver.tolerance})`;
    status.push({ level: 'error', text: `NOT CONVERGED: ${why}. Results are written but must not be trusted.` });
  } else {
    status.push({
      level: 'ok',
      text: `Converged in ${outcome.totalSweeps} sweeps; estimated remaining error in phi ${fmt(relax.errorEstimate)} (tolerance ${scenario.solver.tolerance}).`,
    });
  }
  status.push(...warningStatusLines(warnings));
  if (outcome.truncation.nmaxTried.length > 1) {
    status.push({ level: 'warning', text: `Fock space raised automatically: nmax ${outcome.truncation.nmaxTried.join(' -> ')}.` });
  }
  const lab = resolved.units.hertz !== null;
  const parameterRows: KeyValueRow[] = [
    { label: 'lattice', value: `${resolved.geometry.shape.join(' × ')} sites`, note: resolved.geometry.periodic.map((p) => (p ? 'periodic' : 'open')).join(', ') },
    ...(spacing !== null ? [{ label: 'lattice spacing', value: spacing, unit: 'µm' } as KeyValueRow] : []),
    energyRow('hopping J', resolved.units.hopping, a),
    energyRow('interaction U', resolved.units.interaction, a),
    { label: 'U/J', value: resolved.units.interaction / resolved.units.hopping },
    {
      label: 'U/(zJ) relative to mean-field critical value',
      value: resolved.units.interaction / (resolved.geometry.coordination * resolved.units.hopping) / (3 + 2 * Math.SQRT2),
      note: 'critical U/(zJ) = 3 + 2√2 = 5.83 (mean field, n = 1)',
    },
    energyRow('chemical potential mu', outcome.solve.mu, a, scenario.particles.atoms !== undefined ? 'solved for the atom number' : 'given'),
    energyRow(
      'temperature k_B T',
      outcome.temperature,
      a,
      `${outcome.temperatureSearch ? 'solved for the entropy per atom' : 'given'}${
        resolved.units.nanokelvin !== null ? `; T = ${(outcome.temperature / resolved.units.nanokelvin).toPrecision(4)} nK` : ''
      }`,
    ),
    ...resolved.trapCoefficient.map((k, d) => energyRow(`trap coefficient along ${'xyz'[d]} (per site²)`, k, a)),
    { label: 'nmax (highest occupation kept)', value: outcome.truncation.nmaxUsed },
  ];
  // Laboratory mode: the lattice as the Wannier calculation sees it, axis by axis.
  const laboratory = resolved.laboratory;
  const labRows: KeyValueRow[] = [];
  if (laboratory) {
    const h = laboratory.hubbard;
    labRows.push({ label: 'species', value: h.species.label, note: `${h.species.massU.toFixed(4)} u, a_s = ${h.species.scatteringLengthBohr.toFixed(2)} a_0` });
    h.latticeAxes.slice(0, resolved.geometry.dims).forEach((axis, d) => {
      const name = 'xyz'[d];
      labRows.push(
        { label: `axis ${name}: depth`, value: axis.depthEr, unit: 'E_r', secondValue: axis.depthEr * axis.recoilHz, secondUnit: 'h·Hz' },
        { label: `axis ${name}: recoil energy E_r`, value: axis.recoilHz, unit: 'h·Hz' },
        { label: `axis ${name}: hopping J`, value: axis.tunnellingHz, unit: 'h·Hz' },
        { label: `axis ${name}: next-nearest hopping J_2/J`, value: axis.nnnOverNn },
        { label: `axis ${name}: Wannier rms width`, value: axis.wannierWidthNm, unit: 'nm' },
        { label: `axis ${name}: band gap`, value: axis.bandGapHz, unit: 'h·Hz' },
      );
    });
    for (const [k, axis] of h.harmonicAxes.entries()) {
      labRows.push({ label: `transverse confinement ${k + 1}`, value: axis.trapFrequencyHz, unit: 'Hz', note: `oscillator length ${axis.oscillatorLengthUm.toFixed(3)} µm` });
    }
    laboratory.trapFrequencyHz.forEach((f, d) => {
      labRows.push({ label: `trap frequency ${'xyz'[d]}`, value: f, unit: 'Hz', ...(laboratory.envelopeFrequencyHz[d] > 0 ? { note: `incl. beam envelope ${laboratory.envelopeFrequencyHz[d].toFixed(2)} Hz` } : {}) });
    });
    labRows.push({ label: 'U', value: h.interactionHz, unit: 'h·Hz', secondValue: h.interactionEr, secondUnit: 'E_r' });
  }
  const resultRows: KeyValueRow[] = [
    { label: 'atoms N', value: totals.atoms },
    { label: 'condensed atoms', value: totals.condensedAtoms },
    { label: 'condensate fraction', value: fractionOfAtoms(totals.condensedAtoms, totals.atoms), ...(fractionOfAtoms(1, totals.atoms) === null ? { note: 'no atoms: undefined' } : {}) },
    energyRow(outcome.temperature > 0 ? 'free energy F' : 'energy E', totals.freeEnergy, a),
    { label: 'entropy S', value: totals.entropy, unit: 'k_B' },
    { label: 'entropy per atom', value: fractionOfAtoms(totals.entropy, totals.atoms), unit: 'k_B' },
    { label: 'superfluid spans the cloud', value: classification.superfluidSpans ? 'yes' : 'no' },
  ];
  const visibility = imaging.visibility as { value?: number; definition?: string } | undefined;
  if (visibility?.value !== undefined) {
    const empty = fractionOfAtoms(1, totals.atoms) === null;
    const measuredOn = (visibility as { measuredOn?: string }).measuredOn;
    resultRows.push({
      label: 'time-of-flight visibility V',
      value: empty ? null : visibility.value,
      note: empty ? 'no atoms: undefined' : `measured on ${measuredOn ?? 'the momentum distribution'}; Gerbier et al., PRL 95, 050404 (2005); definition in summary.json`,
    });
    const farField = (visibility as { momentumDistributionValue?: number }).momentumDistributionValue;
    if (farField !== undefined) {
      resultRows.push({ label: 'visibility of n(k) (far-field limit)', value: empty ? null : farField, note: 'the same disks on the momentum distribution, t → ∞' });
    }
  }
  const convergenceRows: KeyValueRow[] = [
    { label: 'converged', value: outcome.converged ? 'yes' : 'NO' },
    { label: 'sweeps (all stages)', value: outcome.totalSweeps },
    { label: 'last max |delta phi|', value: relax.residual },
    { label: 'estimated remaining error', value: relax.errorEstimate, note: 'last change × r/(1 − r)' },
    { label: 'contraction rate r per sweep', value: relax.contractionRate },
    { label: 'extrapolation steps', value: relax.extrapolations },
    { label: 'mu evaluations', value: outcome.solve.muSearch.evaluations },
    { label: 'largest weight on |nmax>', value: outcome.truncation.maxTopWeight, note: `allowed ${scenario.truncation.topWeightMax}` },
    {
      label: 'method',
      value: a.cluster === null ? 'single-site Gutzwiller' : `cluster mean field, ${a.cluster.shape.join(' × ')} clusters`,
      note:
        a.cluster === null
          ? 'every bond decoupled by the mean field'
          : `${a.cluster.clusterCount} clusters in ${a.cluster.colourCount} colours, solved exactly; bonds between clusters decoupled`,
    },
    { label: 'threads', value: a.threadsUsed },
    { label: 'solve time', value: a.timings.solveSeconds, unit: 's' },
    { label: 'analysis time', value: a.timings.analysisSeconds, unit: 's' },
    ...(a.stiffness !== null ? [{ label: 'superfluid-fraction time', value: a.timings.stiffnessSeconds ?? 0, unit: 's', note: `${a.stiffness.solves} twisted solves, ${a.stiffness.sweeps} sweeps, one thread` }] : []),
  ];

  const radiusX = Array.from(profile.meanRadius, (r) => (spacing !== null ? r * spacing : r));
  const frame = radialFrame(resolved.trapCoefficient, resolved.geometry.periodic);
  const radiusUnit = spacing !== null ? 'µm' : 'sites';
  const valid = (arr: ArrayLike<number>) => Array.from(arr, (v, i) => (profile.count[i] > 0 ? v : NaN));
  const shellMarkers = frame === 'none' ? [] : shells.shells.flatMap((s) => [
    ...(s.innerRadius > 0 ? [{ at: (spacing ?? 1) * s.innerRadius, label: `n=${s.filling} inner` }] : []),
    { at: (spacing ?? 1) * s.outerRadius, label: `n=${s.filling} outer` },
  ]);
  const profileBlocks: ReportBlock[] = [
    {
      kind: 'linePlot',
      title: 'Radial profiles',
      caption:
        'Mean over each annular bin; error bars show the spread of sites in the bin.' +
        (frame === 'none' ? ' No trap and every axis periodic: the lattice has no centre, so these bins only sort the sites by where the lattice was cut.' : ' Vertical lines: edges of the Mott shells (where a shell fills half of an annulus).'),
      xAxis: { label: radiusLabel(frame), unit: radiusUnit },
      yAxis: { label: 'atoms per site' },
      series: [
        { label: 'density n', x: radiusX, y: valid(profile.fields.density.mean), yErr: valid(profile.fields.density.std) },
        { label: 'condensate |phi|²', x: radiusX, y: valid(profile.fields.condensateDensity.mean) },
        { label: 'number variance', x: radiusX, y: valid(profile.fields.numberVariance.mean), style: { line: 'dashed' } },
        ...(outcome.temperature > 0 ? [{ label: 'entropy (k_B per site)', x: radiusX, y: valid(profile.fields.entropy.mean), style: { line: 'dotted' as const } }] : []),
      ],
      verticalMarkers: shellMarkers,
    },
  ];
  if (profile.localChemicalPotential) {
    const muLocal = inAllUnitsArray(profile.localChemicalPotential, a.resolved.units.interaction);
    profileBlocks.push({
      kind: 'linePlot',
      title: 'Density against local chemical potential',
      caption: 'Local-density view: each bin plotted at its local chemical potential mu − eps(r); Mott plateaus appear as flat steps at integer density.',
      xAxis: { label: 'local chemical potential (mu − eps)/U' },
      yAxis: { label: 'atoms per site' },
      series: [
        { label: 'density n', x: valid(muLocal), y: valid(profile.fields.density.mean), style: { marker: 'circle', line: 'none' } },
        { label: 'condensate |phi|²', x: valid(muLocal), y: valid(profile.fields.condensateDensity.mean), style: { marker: 'square', line: 'none' } },
      ],
    });
  }

  const doc: ReportDocument = {
    title: `tiercake — ${scenario.name}`,
    subtitle: scenario.description ?? `${resolved.geometry.dims}D lattice, ${resolved.mode === 'laboratory' ? 'laboratory' : 'dimensionless'} parameters`,
    createdIso,
    status,
    sections: [
      {
        heading: 'Parameters',
        blocks: [
          {
            kind: 'keyValueTable',
            caption: lab ? 'Energies in h·Hz and in units of U' : 'Energies in units of J and of U',
            unitSystems: { first: lab ? 'laboratory' : 'units of J', second: 'units of U' },
            rows: parameterRows,
          },
          ...(labRows.length > 0
            ? [{ kind: 'keyValueTable' as const, caption: 'Lattice from the laboratory description (band structure and Wannier functions)', rows: labRows }]
            : []),
          ...landscapeBlocks(a),
          { kind: 'keyValueTable', caption: 'Totals', rows: resultRows },
          ...stiffnessBlocks(a),
        ],
      },
      {
        heading: 'Pictures',
        blocks: images.map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })),
      },
      { heading: 'Profiles', blocks: profileBlocks },
      {
        heading: 'Shells and phases',
        blocks: phaseReportBlocks({ classification, shells, latticeSpacingUm: spacing, interaction: resolved.units.interaction, radialFrame: frame }),
      },
      {
        heading: 'Convergence',
        blocks: [
          { kind: 'keyValueTable', rows: convergenceRows },
          {
            kind: 'residualHistory',
            residuals: outcome.solve.residualHistory,
            tolerance: scenario.solver.tolerance,
            residualLabel: 'max |delta phi| per sweep',
            caption: 'Every sweep of every stage (chemical-potential search, temperature search, compressibility) in order.',
          },
        ],
      },
      {
        heading: 'Cautions',
        blocks: [
          {
            kind: 'cautionList',
            items: cautionsFor({ depthFromBeamPower: false, finiteTemperature: outcome.temperature > 0, showsLocalDensityPlots: true }),
          },
        ],
      },
      {
        heading: 'Scenario',
        blocks: [{ kind: 'codeBlock', caption: 'The scenario as solved (defaults filled in, overrides applied)', code: JSON.stringify(scenario, null, 2) }],
      },
    ],
    footer: `tiercake ${toolVersion()}`,
  };
  return doc;
}

/** The scenario's landscape terms, as summary.json lists them (resolveLandscape.ts records). */
function landscapeBlocks(a: SolveArtifacts): ReportBlock[] {
  const terms = a.resolved.landscape.records;
  if (terms.length === 0) return [];
  return [
    {
      kind: 'table',
      caption: 'Landscape terms added to the site potential (scenario key "landscape"), with their range over the lattice and how each reaches the sites',
      columns: [{ header: 'term' }, { header: 'kind' }, { header: 'minimum' }, { header: 'maximum' }, { header: 'unit' }, { header: 'file (SHA-256)' }, { header: 'method' }],
      rows: terms.map((t) => [
        `[${t.index}] ${t.name}`,
        t.kind,
        t.minimum,
        t.maximum,
        t.energyUnit,
        t.file !== null ? `${t.file.path} (${t.file.sha256.slice(0, 12)}…)` : '—',
        t.method,
      ]),
    },
  ];
}

function inAllUnitsArray(values: Float64Array, unit: number): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i] / unit;
  return out;
}

function fmt(x: number): string {
  return Number.isFinite(x) ? x.toExponential(2) : String(x);
}

/** Condensate fraction and superfluid fraction side by side, with the criterion (solver.stiffness). */
function stiffnessBlocks(a: SolveArtifacts): ReportBlock[] {
  const r = a.stiffness;
  if (r === null) return [];
  const rows: KeyValueRow[] = [
    { label: 'condensate fraction', value: r.condensateFraction, note: 'sum |phi|^2 / N, untwisted' },
    ...r.axes.map((x) => ({
      label: `superfluid fraction, axis ${'xyz'[x.axis]}`,
      value: x.value,
      note:
        x.value === null
          ? (x.reason ?? 'not available')
          : `± ${x.error === null ? '?' : x.error.toExponential(1)} (two twist sizes)${x.converged ? '' : '; NOT converged, see the warning'}`,
    })),
  ];
  return [
    { kind: 'keyValueTable', caption: 'Superfluid stiffness (phase twist)', rows },
    { kind: 'paragraph', text: r.criterion },
  ];
}
