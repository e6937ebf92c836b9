// The report document of a parameter scan: what was scanned and how (axes, chains, warm
// starts), the figures, one row per point, cautions (mean field; warm starts near
// transitions) and the scenario.

import { scenarioRadialFrame } from '../observables/radialFrame.js';
import { MOTT_COMPRESSIBILITY_MAX, SUPERFLUID_FRACTION_MIN } from '../pipeline/scan/stiffnessPhase.js';
import type { KeyValueRow, ReportDocument, StatusLine, CellValue } from './reportModel.js';
import { cautionsFor } from './cautions.js';
import { phaseTitles, phaseNames } from '../observables/phaseCodes.js';
import type { ScanOutcome } from '../output/scanOutputs.js';
import { scanFillings } from '../output/scanOutputs.js';
import type { WrittenImage } from '../output/solveOutputs.js';
import { describeScan } from '../output/scanIdentity.js';
import { toolVersion } from '../output/toolVersion.js';
import { CHARACTERISTIC_DENSITY } from '../pipeline/scan/scanPoint.js';

/** Largest number of points listed row by row (all are in scan.csv). */
const MAX_REPORT_ROWS = 400;

function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return Math.abs(x) >= 1e5 || Math.abs(x) < 1e-3 ? x.toExponential(3) : Number(x.toPrecision(5)).toString();
}

export function buildScanReport(o: ScanOutcome, images: WrittenImage[], createdIso: string, provenanceLines: string[]): ReportDocument {
  const rows = o.rows;
  const bad = rows.filter((r) => !r.converged);
  const status: StatusLine[] = [];
  if (bad.length > 0) {
    status.push({ level: 'error', text: `NOT CONVERGED at ${bad.length} of ${rows.length} points (${bad.slice(0, 12).map((r) => r.point).join(', ')}${bad.length > 12 ? ', …' : ''}); their rows must not be trusted (column converged = 0).` });
  } else {
    status.push({ level: 'ok', text: `All ${rows.length} points converged.` });
  }
  const warm = rows.filter((r) => r.warmStart);
  const cold = rows.filter((r) => !r.warmStart);
  const mean = (list: typeof rows): number => list.reduce((t, r) => t + r.sweeps, 0) / Math.max(1, list.length);
  const finiteTemperature = rows.some((r) => r.temperature > 0);
  const scanRows: KeyValueRow[] = [
    { label: 'scan', value: describeScan(o.plan) },
    ...(o.hold !== null
      ? [{ label: 'characteristic density', value: o.hold === 'trap' ? 'trap held, atom number follows' : 'atom number held, trap curvature scaled', note: 'rho~ = N (V/J)^(d/2), Rigol et al., PRA 79, 053605 (2009)' }]
      : []),
    { label: 'solve order', value: o.plan.axes.length === 2 ? 'snake through the grid (second axis back and forth)' : 'in order of the values' },
    { label: 'chains', value: `${o.plan.chainCount} of up to ${o.plan.chainLength} points`, note: o.plan.realisations > 1 ? `every realisation is solved cold (${o.plan.realisations} per point), so chains and shards give the same bits` : 'each chain starts cold; shards hold whole chains, so a split scan gives the same bits' },
    { label: 'sweeps per point, warm-started', value: warm.length > 0 ? mean(warm) : null, note: `${warm.length} points` },
    { label: 'sweeps per point, cold-started', value: cold.length > 0 ? mean(cold) : null, note: o.plan.realisations > 1 ? `${cold.length} points, summed over their ${o.plan.realisations} realisations` : `${cold.length} points (first of each chain)` },
    { label: 'energy unit of the table', value: o.energyUnit },
    ...provenanceLines.map((line) => ({ label: 'produced by', value: line })),
  ];
  const fillings = scanFillings(rows);
  // solver.stiffness on: the superfluid fraction stands beside the condensate fraction
  const withStiffness = rows.some((r) => !Number.isNaN(r.superfluidFraction));
  const withSpread = o.plan.realisations > 1 && withStiffness;
  const labelled = rows.some((r) => r.stiffnessPhase !== null);
  const shareText = (r: (typeof rows)[number]): string => {
    if (r.stiffnessPhase === null) return '—';
    const title = phaseTitles[r.stiffnessPhase];
    if (r.realisations <= 1 || r.phaseShares === null) return title;
    return `${title} (${Math.round(Math.max(...r.phaseShares) * r.realisations)}/${r.realisations})`;
  };
  const frame = scenarioRadialFrame(o.scenario);
  const columns = [
    ...o.plan.axes.map((a) => ({ header: a.path })),
    { header: 'converged' },
    { header: 'atoms' },
    { header: 'mu', unit: o.energyUnit },
    ...(finiteTemperature ? [{ header: 'kT', unit: o.energyUnit }] : []),
    { header: 'condensate fraction' },
    ...(withStiffness ? [{ header: 'superfluid fraction (twist)' }] : []),
    ...(withSpread ? [{ header: 'f_s spread' }] : []),
    ...(labelled ? [{ header: 'phase by stiffness' }] : []),
    { header: 'central density' },
    { header: 'central phase' },
    { header: 'superfluid', unit: 'sites' },
    { header: 'Bose glass', unit: 'sites' },
    ...fillings.map((f) => ({ header: `n = ${f} shell`, unit: frame === 'none' ? 'sites in the shell' : 'radius in sites' })),
    { header: 'sweeps' },
  ];
  const table: CellValue[][] = rows.slice(0, MAX_REPORT_ROWS).map((r) => [
    ...r.values,
    r.converged ? 'yes' : 'NO',
    r.atoms,
    r.chemicalPotential,
    ...(finiteTemperature ? [r.temperature] : []),
    r.condensateFraction,
    ...(withStiffness ? [r.superfluidFraction] : []),
    ...(withSpread ? [r.superfluidFractionSpread] : []),
    ...(labelled ? [shareText(r)] : []),
    r.centralDensity,
    phaseTitles[phaseNames[r.centralPhase]],
    r.phaseSites[phaseNames.indexOf('superfluid')],
    r.phaseSites[phaseNames.indexOf('boseGlass')],
    ...fillings.map((f) => {
      const s = r.shells.find((x) => x.filling === f);
      if (!s) return '—';
      return frame === 'none' ? s.sites : `${fmt(s.innerRadius)} – ${fmt(s.outerRadius)}`;
    }),
    r.sweeps,
  ]);
  return {
    title: `tiercake — ${o.scenario.name}: scan of ${o.plan.axes.map((a) => a.path).join(' and ')}`,
    subtitle: o.scenario.description ?? `${o.scenario.lattice.shape.length}D lattice, ${rows.length} points`,
    createdIso,
    status,
    sections: [
      { heading: 'Scan', blocks: [{ kind: 'keyValueTable', rows: scanRows }] },
      {
        heading: 'Figures',
        blocks: [
          ...images.map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })),
          {
            kind: 'paragraph',
            text:
              (frame === 'trap'
                ? 'Shell radii are trap-scaled radii in sites (each axis scaled by the square root of its trap curvature relative to the first trapped axis): a shell edge is where half ' +
                  'the sites of a radial bin belong to the shell; a central shell starts at 0.'
                : frame === 'latticeCentre'
                  ? 'There is no trap: shell radii are distances in sites from the lattice centre (a shell edge is where half the sites of a radial bin belong to the shell), not trap radii.'
                  : 'There is no trap and every axis is periodic, so the lattice has no centre: a shell is a region, not a ring, and the table gives the sites it holds instead of radii.') +
              ' Phases are the site labels of `tiercake solve`.' +
              (o.plan.axes.some((a) => a.path === CHARACTERISTIC_DENSITY)
                ? ' At fixed U/J, clouds with the same characteristic density have (in the local-density approximation) the same central density and the same phases at the same radius in units of sqrt(J/V), whatever N and V are.'
                : ''),
          },
        ],
      },
      {
        heading: 'Points',
        blocks: [
          {
            kind: 'table',
            caption: rows.length > MAX_REPORT_ROWS ? `First ${MAX_REPORT_ROWS} of ${rows.length} points; all are in scan.csv` : 'All points (also in scan.csv, with more columns)',
            columns,
            rows: table,
          },
        ],
      },
      {
        heading: 'Cautions',
        blocks: [
          {
            kind: 'cautionList',
            items: [
              ...cautionsFor({ depthFromBeamPower: false, finiteTemperature, showsLocalDensityPlots: false }),
              ...(labelled
                ? [
                    {
                      title: 'Phase by stiffness on a finite lattice',
                      text:
                        `Each point is labelled as a whole: Mott insulator when every site holds the same integer filling and the lattice is incompressible (mean dn/dmu per site below ${MOTT_COMPRESSIBILITY_MAX}/U at T = 0), superfluid when the superfluid fraction ` +
                        `from a phase twist is at least ${SUPERFLUID_FRACTION_MIN}, Bose glass when compressible below it (normal fluid at T > 0), the criterion of Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989). ` +
                        'Both thresholds are our choice. Mean field gives a Bose glass a small, not exactly zero, superfluid fraction, and a clean superfluid loses its superfluid fraction continuously at the Mott boundary, so a sliver next to the superfluid boundary is misplaced by any threshold. ' +
                        'The compressibility is a finite difference over a small step of mu: a finite lattice in the Bose glass has a small gap set by its rarest sites and could read incompressible at very small J; the one-filling test catches this where sites sit at two fillings (in the infinite lattice such domains always hold sites at a filling change). ' +
                        'Larger lattices and more realisations (--realisations) sharpen the Mott / Bose glass boundary; mean field also misplaces the critical hopping itself (quantum Monte Carlo finds the clean 2D n = 1 tip at (U/J)c = 16.74 against 23.3 here).',
                    },
                  ]
                : []),
              {
                title: 'Warm starts near transitions',
                text:
                  'Each point starts from the solution of its neighbour. Where mean-field theory has more than one self-consistent solution (close to the finite-temperature ' +
                  'superfluid transition, or where a shell is about to form), a warm-started point can settle on the branch of its neighbour while a cold solve finds another; ' +
                  'the difference shows as a jump in the table. Solve such a point on its own (`tiercake solve` with --set) to compare.',
              },
            ],
          },
        ],
      },
      {
        heading: 'Scenario',
        blocks: [{ kind: 'codeBlock', caption: `The scenario as run before the scan's overrides (defaults filled in); SHA-256 ${o.scenarioHash}`, code: JSON.stringify(o.scenario, null, 2) }],
      },
    ],
    footer: `tiercake ${toolVersion()}`,
  };
}
