// The files of a finished scan (one run, or merged shards), from plain rows: no physics
// here. The folder holds
//   scan.csv            one row per point in grid order (first axis slowest); the header is
//                       the first line; every column is a number (codes and flags as
//                       integers), NaN written 'nan' where a reading is undefined
//   summary.json        the scan (scenario, axes, chain length), the CSV's columns with
//                       their units and meaning, convergence and warm-start totals, and
//                       `provenance` (how it was produced: the only part that differs
//                       between a single run and merged shards)
//   images/*.png        the main readings against the parameter (line plots), or as maps
//                       over the two parameters
//   report.html         the same, with the table and the scenario
//   points/point-NNNNNN/  per-point output folders, as `tiercake solve` writes them (--keep-points)

import type { OutputFolder } from './outputFolder.js';
import { toCsv, type CsvColumn } from '../formats/csv.js';
import { renderFieldMapSvg, renderLinePlotSvg, renderPhaseMapSvg, sideBySideSvg } from '../figures/index.js';
import type { GridAxis, LineSeries } from '../figures/index.js';
import { figureImage, type WrittenImage } from './solveOutputs.js';
import { seriesColor } from '../figures/figurePalette.js';
import { PhaseCode, phaseNames, phaseTitles } from '../observables/phaseCodes.js';
import { MOTT_COMPRESSIBILITY_MAX, STIFFNESS_PHASES, SUPERFLUID_FRACTION_MIN } from '../pipeline/scan/stiffnessPhase.js';
import type { ScanPlan } from '../pipeline/scan/scanPlan.js';
import type { ScanRow } from '../pipeline/scan/scanRow.js';
import type { DensityHold } from '../pipeline/scan/scanPoint.js';
import { CHARACTERISTIC_DENSITY } from '../pipeline/scan/scanPoint.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { toolStamp } from './recordFields.js';

export interface ScanOutcome {
  scenario: Scenario;
  scenarioHash: string;
  scanHash: string;
  plan: ScanPlan;
  hold: DensityHold | null;
  /** energy unit of chemical_potential and temperature (scanEnergyUnit) */
  energyUnit: string;
  keepPoints: boolean;
  /** one row per point, by point index */
  rows: ScanRow[];
  provenance: Record<string, unknown>;
}

export interface ColumnInfo {
  name: string;
  unit: string;
  description: string;
}

const snake = (name: string): string => name.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

/** Mott fillings that occur at any point, ascending. */
export function scanFillings(rows: readonly ScanRow[]): number[] {
  return [...new Set(rows.flatMap((r) => r.shells.map((s) => s.filling)))].sort((a, b) => a - b);
}

/** A CSV column: its description and the reading it takes from each row. */
interface ScanColumn extends ColumnInfo {
  value: (r: ScanRow) => number;
}

type ScanColumnSource = Pick<ScanOutcome, 'plan' | 'rows' | 'energyUnit' | 'hold'>;

/** Every CSV column in order: one list, so the header, the rows and summary.json's descriptions cannot drift apart. */
function scanColumnTable(o: ScanColumnSource): ScanColumn[] {
  const e = o.energyUnit;
  const axes: ScanColumn[] = o.plan.axes.map((a, k) => ({
    name: a.path,
    unit: a.path === CHARACTERISTIC_DENSITY ? 'atoms' : 'the scenario key\'s own (see the scenario reference)',
    description:
      a.path === CHARACTERISTIC_DENSITY
        ? `scanned characteristic density N (V/J)^(d/2) (Rigol et al., PRA 79, 053605 (2009)), with the ${o.hold === 'atoms' ? 'atom number held and the trap scaled' : 'trap held and the atom number following'}`
        : `scanned scenario value (${a.spacing === 'log' ? 'logarithmic steps' : a.spacing === 'list' ? 'listed values' : 'equal steps'})`,
    value: (r) => r.values[k],
  }));
  const phaseColumns: ScanColumn[] = phaseNames.map((p, c) => ({ name: `${snake(p)}_sites`, unit: 'sites', description: `sites labelled ${phaseTitles[p]}`, value: (r) => r.phaseSites[c] }));
  const shell = (r: ScanRow, f: number) => r.shells.find((s) => s.filling === f);
  const shellColumns: ScanColumn[] = scanFillings(o.rows).flatMap((f) => [
    { name: `shell_${f}_inner_radius`, unit: 'sites', description: `inner edge of the n = ${f} Mott shell: trap-scaled radius where half the sites of a radial bin belong to it (0 for a central shell; nan where there is no such shell)`, value: (r) => shell(r, f)?.innerRadius ?? NaN },
    { name: `shell_${f}_outer_radius`, unit: 'sites', description: `outer edge of the n = ${f} Mott shell, the same rule`, value: (r) => shell(r, f)?.outerRadius ?? NaN },
    { name: `shell_${f}_sites`, unit: 'sites', description: `sites in the n = ${f} Mott shell (0: none)`, value: (r) => shell(r, f)?.sites ?? 0 },
  ]);
  return [
    ...axes,
    { name: 'atoms', unit: 'atoms', description: 'total atom number N', value: (r) => r.atoms },
    { name: 'chemical_potential', unit: e, description: 'chemical potential mu (at the trap centre, as the scenario defines it)', value: (r) => r.chemicalPotential },
    { name: 'condensed_atoms', unit: 'atoms', description: 'sum of |phi_i|^2 over the sites (Gutzwiller condensate)', value: (r) => r.condensedAtoms },
    { name: 'condensate_fraction', unit: '1', description: 'condensed_atoms / atoms', value: (r) => r.condensateFraction },
    { name: 'superfluid_fraction', unit: '1', description: 'superfluid fraction from the curvature of the grand potential under a phase twist, mean over the periodic axes (solver.stiffness; nan when off or no axis is periodic). Compressible with superfluid_fraction near 0: Bose glass (Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989))', value: (r) => r.superfluidFraction },
    { name: 'superfluid_fraction_error', unit: '1', description: 'numerical error of superfluid_fraction from two twist sizes, the largest over the axes (nan with it)', value: (r) => r.superfluidFractionError },
    { name: 'entropy', unit: 'k_B', description: 'total entropy S (0 in the ground state)', value: (r) => r.entropy },
    { name: 'entropy_per_atom', unit: 'k_B', description: 'S / N', value: (r) => r.entropyPerAtom },
    { name: 'temperature', unit: e, description: 'k_B T (solved for at fixed entropy per atom)', value: (r) => r.temperature },
    { name: 'characteristic_density', unit: 'atoms', description: 'N prod_d sqrt(V_d / J_d), V_d the trap curvature per site^2 (Rigol et al., PRA 79, 053605 (2009)); nan without a trap on every axis', value: (r) => r.characteristicDensity },
    { name: 'characteristic_length', unit: 'sites', description: 'sqrt(J / V) along the first trapped axis; radius / characteristic_length is the radius in the units rho~ is defined with', value: (r) => r.characteristicLength },
    { name: 'central_density', unit: 'atoms per site', description: 'mean density of the sites nearest the trap centre', value: (r) => r.centralDensity },
    { name: 'central_phase', unit: 'code', description: 'phase of those sites: 0 empty, 1 superfluid, 2 Mott insulator, 3 Bose glass, 4 normal fluid', value: (r) => r.centralPhase },
    ...phaseColumns,
    ...shellColumns,
    { name: 'nmax', unit: 'atoms per site', description: 'Fock-space truncation used (raised automatically when needed)', value: (r) => r.nmax },
    { name: 'sweeps', unit: 'sweeps', description: 'red-black sweeps of the solve (all chemical-potential and temperature steps)', value: (r) => r.sweeps },
    { name: 'mu_evaluations', unit: 'solves', description: 'chemical-potential evaluations of the last fixed-N search (1 at fixed mu)', value: (r) => r.muEvaluations },
    { name: 'warm_start', unit: 'flag', description: '1: started from the previous points of its chain, 0: cold start (first point of a chain)', value: (r) => (r.warmStart ? 1 : 0) },
    { name: 'converged', unit: 'flag', description: '1: converged (self-consistency, atom number, temperature, truncation), 0: not; do not trust those rows', value: (r) => (r.converged ? 1 : 0) },
    { name: 'realisations', unit: 'realisations', description: 'disorder realisations behind the row (scan --realisations; seeds "<disorder.seed>/r"); with more than one, the readings are their means', value: (r) => r.realisations },
    { name: 'superfluid_fraction_spread', unit: '1', description: 'sample standard deviation of superfluid_fraction over the realisations (nan for one realisation); standard error of the mean = spread / sqrt(realisations)', value: (r) => r.superfluidFractionSpread },
    { name: 'compressibility_per_site', unit: '1/U', description: '(1/sites) sum_i dn_i/dmu times U at the trap centre (nan when solver.compressibility is off)', value: (r) => r.compressibilityPerSite },
    {
      name: 'stiffness_phase',
      unit: 'code',
      description:
        `the lattice's phase by the stiffness criterion (Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989)), the label most realisations carry: ${PhaseCode.mott} Mott insulator (every site at one integer filling and compressibility_per_site below ${MOTT_COMPRESSIBILITY_MAX} at T = 0), ` +
        `${PhaseCode.superfluid} superfluid (superfluid_fraction at least ${SUPERFLUID_FRACTION_MIN}), ${PhaseCode.boseGlass} Bose glass (compressible, below it), ${PhaseCode.normalFluid} normal fluid (the same at T > 0), ${PhaseCode.empty} empty; ` +
        'nan without the compressibility or the superfluid fraction (solver.stiffness on a periodic axis). Both thresholds are our choice',
      value: (r) => (r.stiffnessPhase === null ? NaN : PhaseCode[r.stiffnessPhase]),
    },
    ...STIFFNESS_PHASES.flatMap((p, k): ScanColumn[] =>
      p === 'empty' ? [] : [{ name: `${snake(p)}_share`, unit: '1', description: `fraction of the realisations labelled ${phaseTitles[p]} by stiffness_phase's rule (nan when unlabelled)`, value: (r) => r.phaseShares?.[k] ?? NaN }],
    ),
  ];
}

/** Name, unit and meaning of every CSV column, in order. */
export function scanColumns(o: ScanColumnSource): ColumnInfo[] {
  return scanColumnTable(o).map(({ name, unit, description }) => ({ name, unit, description }));
}

/** The CSV: header on the first line, one row per point. */
export function scanCsv(o: ScanColumnSource): string {
  return toCsv(scanColumnTable(o).map((c): CsvColumn => ({ name: c.name, values: o.rows.map(c.value) })));
}

/** summary.json: everything but `provenance` is the same for one run and merged shards. */
export function scanSummary(o: ScanOutcome): Record<string, unknown> {
  const notConverged = o.rows.filter((r) => !r.converged).map((r) => r.point);
  const warm = o.rows.filter((r) => r.warmStart);
  const cold = o.rows.filter((r) => !r.warmStart);
  return {
    format: 'tiercake-scan',
    formatVersion: 1,
    tool: toolStamp(),
    scenarioName: o.scenario.name,
    scenarioHash: o.scenarioHash,
    scanHash: o.scanHash,
    axes: o.plan.axes.map((a) => ({ path: a.path, spacing: a.spacing, values: a.values })),
    characteristicDensityHold: o.hold,
    points: o.plan.pointCount,
    solveOrder: o.plan.axes.length === 2 ? 'snake: the second axis forwards on even rows of the first, backwards on odd rows' : 'in order of the values',
    chainLength: o.plan.chainLength,
    chains: o.plan.chainCount,
    realisationsPerPoint: o.plan.realisations,
    ...(o.plan.realisations > 1
      ? { realisationRule: 'realisation r of every point uses disorder.seed "<seed>/r" (the ensemble rule) and is solved cold; each row holds the means over the realisations, superfluid_fraction_spread their spread' }
      : {}),
    stiffnessPhaseRule: {
      criterion: 'Mott insulator: incompressible; Bose glass: compressible with (almost) zero superfluid fraction; superfluid: finite superfluid fraction (Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989))',
      mottCompressibilityMaxPerU: MOTT_COMPRESSIBILITY_MAX,
      superfluidFractionMin: SUPERFLUID_FRACTION_MIN,
      thresholds: 'our choice, no published convention: a mean-field Bose glass has a small, not exactly zero, superfluid fraction, and next to the superfluid boundary any threshold misplaces a sliver',
    },
    warmStarts:
      'each chain of consecutive points (in solve order) starts cold; every later point starts from the previous ones: order parameter, mu and T extrapolated linearly, ' +
      'dN/dmu for the first step of a fixed-N search, nmax',
    energyUnit: o.energyUnit,
    shellRadii: 'trap-scaled radius in sites: distance from the trap centre with each axis scaled by sqrt(V_d / V_ref), V_ref the first trapped axis',
    columns: scanColumns(o),
    converged: notConverged.length === 0,
    notConvergedPoints: notConverged,
    sweeps: {
      total: o.rows.reduce((t, r) => t + r.sweeps, 0),
      meanWarmStarted: warm.length > 0 ? warm.reduce((t, r) => t + r.sweeps, 0) / warm.length : null,
      meanColdStarted: cold.length > 0 ? cold.reduce((t, r) => t + r.sweeps, 0) / cold.length : null,
    },
    keepPoints: o.keepPoints,
    scenario: o.scenario,
    provenance: o.provenance,
  };
}

/** How the grid cells of a map map to an axis: linear values as they are, log steps as log10, a list by index. */
function gridAxisOf(plan: ScanPlan, a: number): GridAxis {
  const axis = plan.axes[a];
  const v = axis.values;
  if (v.length < 2) return { label: axis.path, origin: v[0], step: 1 };
  if (axis.spacing === 'log') return { label: `log10 ${axis.path}`, origin: Math.log10(v[0]), step: Math.log10(v[1] / v[0]) };
  const step = v[1] - v[0];
  const even = step > 0 && v.every((x, k) => Math.abs(x - (v[0] + k * step)) <= 1e-9 * Math.max(Math.abs(x), Math.abs(step)));
  return even ? { label: axis.path, origin: v[0], step } : { label: `${axis.path} (index of the listed values)`, origin: 0, step: 1 };
}

const marker = { marker: 'circle' as const };

/** The figures of a scan: line plots for one axis, maps for two. */
export function scanImages(o: ScanOutcome): WrittenImage[] {
  const rows = o.rows;
  const axis = o.plan.axes[0];
  if (o.plan.axes.length === 1) {
    const x = rows.map((r) => r.values[0]);
    const xAxis = { label: axis.path, ...(axis.spacing === 'log' ? { log: true } : {}) };
    const series = (label: string, f: (r: ScanRow) => number): LineSeries => ({ label, x, y: rows.map(f), style: marker });
    const atoms = renderLinePlotSvg({ title: 'Atoms', xAxis, yAxis: { label: 'atoms' }, series: [series('all atoms N', (r) => r.atoms), series('condensed atoms', (r) => r.condensedAtoms)], widthPx: 460, heightPx: 320 });
    const centre = renderLinePlotSvg({
      title: 'Centre and condensate',
      xAxis,
      yAxis: { label: 'value' },
      series: [series('central density (atoms/site)', (r) => r.centralDensity), series('condensate fraction', (r) => r.condensateFraction)],
      widthPx: 460,
      heightPx: 320,
    });
    const fillings = scanFillings(rows);
    // One colour per filling: outer edge solid, inner edge dashed.
    const shellSeries: LineSeries[] = fillings.flatMap((f, k) => [
      { label: `n = ${f} outer`, x, y: rows.map((r) => r.shells.find((s) => s.filling === f)?.outerRadius ?? NaN), style: { ...marker, color: seriesColor(k) } },
      {
        label: `n = ${f} inner`,
        x,
        y: rows.map((r) => r.shells.find((s) => s.filling === f)?.innerRadius ?? NaN),
        style: { marker: 'square' as const, line: 'dashed' as const, color: seriesColor(k) },
      },
    ]);
    const shells = renderLinePlotSvg({
      title: 'Mott shell radii',
      xAxis,
      yAxis: { label: 'trap-scaled radius', unit: 'sites' },
      series: shellSeries.length > 0 ? shellSeries : [{ label: 'no Mott shell at any point', x, y: rows.map(() => NaN) }],
      widthPx: 460,
      heightPx: 320,
    });
    const phases = renderLinePlotSvg({
      title: 'Sites per phase',
      xAxis,
      yAxis: { label: 'sites' },
      series: (['superfluid', 'mott', 'boseGlass', 'normalFluid'] as const)
        .filter((p) => rows.some((r) => r.phaseSites[phaseNames.indexOf(p)] > 0))
        .map((p) => series(phaseTitles[p], (r) => r.phaseSites[phaseNames.indexOf(p)])),
      widthPx: 460,
      heightPx: 320,
    });
    const stiffness = rows.some((r) => r.superfluidFraction === r.superfluidFraction)
      ? [
          figureImage(
            'images/scan_stiffness.png',
            `Superfluid fraction (phase twist) and condensate fraction against ${axis.path}`,
            renderLinePlotSvg({
              title: 'Superfluid and condensate fraction',
              xAxis,
              yAxis: { label: 'fraction' },
              series: [series('superfluid fraction f_s (twist)', (r) => r.superfluidFraction), series('condensate fraction', (r) => r.condensateFraction)],
              widthPx: 560,
              heightPx: 360,
            }),
          ),
        ]
      : [];
    const labelled = rows.some((r) => r.phaseShares !== null);
    const phaseLines = labelled
      ? [
          figureImage(
            'images/scan_disorder_phases.png',
            `Share of realisations in each phase by the stiffness criterion against ${axis.path}`,
            renderLinePlotSvg({
              title: rows.some((r) => r.realisations > 1) ? `Phase by stiffness (share of ${Math.max(...rows.map((r) => r.realisations))} realisations)` : 'Phase by stiffness',
              xAxis,
              yAxis: { label: 'share of realisations' },
              series: STIFFNESS_PHASES.flatMap((p, k) =>
                p !== 'empty' && rows.some((r) => (r.phaseShares?.[k] ?? 0) > 0) ? [series(phaseTitles[p], (r) => r.phaseShares?.[k] ?? NaN)] : [],
              ),
              widthPx: 560,
              heightPx: 360,
            }),
          ),
        ]
      : [];
    return [
      ...stiffness,
      ...phaseLines,
      figureImage('images/scan_cloud.png', `Atoms, central density and condensate fraction against ${axis.path}`, sideBySideSvg([atoms, centre], `Cloud against ${axis.path}`)),
      figureImage('images/scan_shells.png', `Mott shell radii and sites per phase against ${axis.path}`, sideBySideSvg([shells, phases], `Shells and phases against ${axis.path}`)),
    ];
  }
  const [n1, n2] = o.plan.counts;
  const xAxis = gridAxisOf(o.plan, 0);
  const yAxis = gridAxisOf(o.plan, 1);
  const map = (title: string, bar: string, f: (r: ScanRow) => number, colorMap?: string): string =>
    renderFieldMapSvg({ values: rows.map(f), nx: n1, ny: n2, xAxis, yAxis, title, colorBarLabel: bar, minImagePx: 300, ...(colorMap ? { colorMap } : {}) });
  const sf = phaseNames.indexOf('superfluid');
  const mott = phaseNames.indexOf('mott');
  return [
    figureImage(
      'images/scan_map_cloud.png',
      `Condensate fraction and central density over ${o.plan.axes[0].path} and ${o.plan.axes[1].path}`,
      sideBySideSvg([map('Condensate fraction', 'condensed / all atoms', (r) => r.condensateFraction), map('Central density', 'atoms per site', (r) => r.centralDensity)], 'Cloud over the scan'),
    ),
    figureImage(
      'images/scan_map_phases.png',
      `Superfluid and Mott sites over ${o.plan.axes[0].path} and ${o.plan.axes[1].path}`,
      sideBySideSvg([map('Superfluid sites', 'sites', (r) => r.phaseSites[sf]), map('Mott sites', 'sites', (r) => r.phaseSites[mott])], 'Phases over the scan'),
    ),
    // With solver.stiffness: where the condensate fraction stays finite but the superfluid
    // fraction vanishes, the puddles carry no superflow (Bose glass, when compressible).
    ...(rows.some((r) => r.superfluidFraction === r.superfluidFraction)
      ? [
          figureImage(
            'images/scan_map_stiffness.png',
            `Superfluid fraction (phase twist) beside the condensate fraction over ${o.plan.axes[0].path} and ${o.plan.axes[1].path}`,
            sideBySideSvg(
              [map('Superfluid fraction f_s', 'f_s (twist)', (r) => r.superfluidFraction), map('Condensate fraction', 'condensed / all atoms', (r) => r.condensateFraction)],
              'Superflow against condensate over the scan',
            ),
          ),
        ]
      : []),
    ...disorderPhaseMap(o, xAxis, yAxis, map),
  ];
}

/**
 * Two-axis scans with a stiffness label at every point: the regions (the label most
 * realisations carry; Mott cells shaded by their filling), how many realisations agree with
 * it, and the spread of the superfluid fraction between realisations.
 */
function disorderPhaseMap(o: ScanOutcome, xAxis: GridAxis, yAxis: GridAxis, map: (title: string, bar: string, f: (r: ScanRow) => number, colorMap?: string) => string): WrittenImage[] {
  const rows = o.rows;
  if (!rows.every((r) => r.stiffnessPhase !== null)) return [];
  const [n1, n2] = o.plan.counts;
  const regions = renderPhaseMapSvg({
    phase: rows.map((r) => PhaseCode[r.stiffnessPhase as keyof typeof PhaseCode]),
    filling: rows.map((r) => Math.max(1, Math.round(r.centralDensity))),
    nx: n1,
    ny: n2,
    xAxis,
    yAxis,
    title: 'Phase by stiffness',
    legendTitle: 'phase',
    minImagePx: 300,
  });
  const r = o.plan.realisations;
  const panels = [regions];
  if (r > 1) {
    panels.push(map(`Agreement of ${r} realisations`, 'share with the label', (x) => Math.max(...(x.phaseShares ?? [NaN]))));
    panels.push(map('Superfluid fraction spread', 'std. dev. over realisations', (x) => x.superfluidFractionSpread));
  } else {
    panels.push(map('Compressibility', 'per site, 1/U', (x) => x.compressibilityPerSite));
  }
  return [
    figureImage(
      'images/scan_map_disorder_phases.png',
      `Mott insulator, Bose glass and superfluid over ${o.plan.axes[0].path} and ${o.plan.axes[1].path} by the stiffness criterion ` +
        `(one filling and incompressible: Mott; superfluid fraction at least ${SUPERFLUID_FRACTION_MIN}: superfluid; else Bose glass; thresholds of our choice)` +
        (r > 1 ? `, with the agreement and the spread of ${r} disorder realisations` : ''),
      sideBySideSvg(panels, 'Disorder phase map'),
    ),
  ];
}

/** Write scan.csv, summary.json, the images and the report into `folder`. */
export function writeScanFiles(o: ScanOutcome, folder: OutputFolder, reportHtml: (images: WrittenImage[]) => string): void {
  folder.write('scan.csv', scanCsv(o));
  folder.write('summary.json', `${JSON.stringify(scanSummary(o), null, 2)}\n`);
  const images = scanImages(o);
  for (const img of images) folder.write(img.file, img.png);
  folder.write('report.html', reportHtml(images));
}
