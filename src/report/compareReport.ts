// The report of `tiercake compare`: status (did the fit and the solve at the best values
// converge, every warning of the run with its code: a parameter at a bound, plain
// Beer-Lambert, masked pixels, ...), the best values with their uncertainties (noise model
// and bootstrap), the pictures, the radial profiles with the model's uncertainty band, the
// equation of state, the fluctuation thermometry of a stack, the shots, the settings and
// the scenario as given. Builds the document model only (reportModel.ts); renderReport.ts
// turns it into HTML.

import { sourceShortName } from '../imaging/camera/frameAddress.js';
import type { CompareFit } from '../pipeline/compareFit.js';
import type { EquationOfStateReading } from '../pipeline/compareEquationOfState.js';
import type { ThermometryReading } from '../pipeline/compareThermometry.js';
import type { CompareProvenance } from '../output/compareOutputs.js';
import type { CellValue, KeyValueRow, ReportBlock, ReportDocument, ReportSection, StatusLine } from './reportModel.js';

export interface CompareReportInputs {
  imagePath: string;
  /** colour figures to show, in order */
  images: ReadonlyArray<{ file: string; title: string; svg: string; png: Uint8Array }>;
  createdIso: string;
  toolVersion: string;
  provenance?: CompareProvenance;
  eos?: EquationOfStateReading;
  thermometry?: ThermometryReading;
}

const serious = new Set(['solve-not-converged']);

/** Status lines: convergence first, then every warning of the run (code and message). */
export function compareStatus(c: CompareFit, warnings: readonly { code: string; message: string }[] = c.warnings): StatusLine[] {
  const status: StatusLine[] = [];
  if (!c.best.converged) status.push({ level: 'error', text: 'The solve at the best-fit values did NOT converge; the fit must not be trusted.' });
  status.push(
    c.fit.converged
      ? { level: 'ok', text: `Fit converged (${c.fit.message}) after ${c.fit.iterations} steps and ${c.fit.solves} solves.` }
      : { level: 'warning', text: `Fit stopped before convergence (${c.fit.message}); raise --max-iterations.` },
  );
  for (const w of warnings) {
    if (w.code === 'fit-not-converged' || serious.has(w.code)) continue; // said above
    status.push({ level: 'warning', text: `${w.code}: ${w.message}` });
  }
  return status;
}

const labels: Record<string, string> = {
  atoms: 'atom number N',
  mu: 'chemical potential mu',
  kT: 'temperature k_B T',
  entropyPerAtom: 'entropy per atom S/(N k_B)',
  trapFrequencyFactor: 'factor on the trap frequencies',
  centreXPixels: 'trap centre x (column of the given frame)',
  centreYPixels: 'trap centre y (row of the given frame, from the top)',
  angleDeg: 'turn of the lattice against the camera',
  psfSigma: 'PSF sigma',
  offset: 'background offset',
};

function fitSection(c: CompareFit): ReportSection {
  const unitOf = (unit: string) => (unit === 'atoms' ? '' : unit);
  const rows: CellValue[][] = c.parameters.map((r) => [labels[r.name] ?? r.name, r.best, r.uncertainty, r.bootstrapUncertainty, unitOf(r.unit), r.start, r.atBound ? 'on its bound' : '']);
  const summary: KeyValueRow[] = [
    { label: 'reduced chi-square', value: c.fit.reducedChiSquare, note: `${c.fit.degreesOfFreedom} degrees of freedom, ${c.fit.chiSquarePixels === 'signal' ? 'pixels where model or data stand above the noise' : 'all used pixels'}` },
    { label: 'reduced chi-square, all used pixels', value: c.fit.allPixels.reducedChiSquare, note: `${c.fit.allPixels.degreesOfFreedom} degrees of freedom (what the fit minimised)` },
    { label: 'solves', value: c.fit.solves, note: `${c.fit.interpolated} evaluations from the fit's linear model between solves` },
    { label: 'background subtracted', value: c.background, unit: 'atoms per pixel' },
    { label: 'atoms in the model picture', value: c.atomsInPicture },
  ];
  return {
    heading: 'Fit',
    blocks: [
      {
        kind: 'table',
        caption: 'Best values. Uncertainty: standard uncertainty from the noise model, enlarged by √χ²_ν when χ²_ν > 1; bootstrap: spread over resamples of the shots (a stack only). Centre in pixels of the frame as given.',
        columns: [{ header: 'parameter', align: 'left' }, { header: 'best' }, { header: '± uncertainty' }, { header: '± bootstrap' }, { header: 'unit', align: 'left' }, { header: 'start' }, { header: 'note', align: 'left' }],
        rows,
      },
      { kind: 'keyValueTable', rows: summary },
      { kind: 'paragraph', text: `Weights: ${c.noise.description}.` },
    ],
  };
}

function eosBlocks(eos: EquationOfStateReading | undefined, figure: ReportBlock | undefined): ReportBlock[] {
  if (eos === undefined) return [];
  if (!eos.available) return [{ kind: 'paragraph', text: `No equation of state: ${eos.reason}.` }];
  return [
    ...(figure !== undefined ? [figure] : []),
    {
      kind: 'paragraph',
      text:
        `Method: ${eos.method}. Chemical potential at the trap centre mu0 = ${eos.centralChemicalPotential.toPrecision(5)} ${eos.energyUnit}, kT = ${eos.kT.toPrecision(4)} ${eos.energyUnit} (fitted). ` +
        `Chi-square of the measured points about the homogeneous curve: ${eos.chiSquare.toPrecision(4)} for ${eos.points} points. ` +
        'The model picture analysed the same way shows what imaging and the finite trap do to the reading without noise. Table: equation_of_state.csv.',
    },
  ];
}

function thermometryBlocks(t: ThermometryReading | undefined, figure: ReportBlock | undefined): ReportBlock[] {
  if (t === undefined) return [];
  if (!t.available) return [{ kind: 'paragraph', text: `No fluctuation thermometry: ${t.reason}.` }];
  return [
    ...(figure !== undefined ? [figure] : []),
    {
      kind: 'keyValueTable',
      rows: [
        { label: 'kT from the fluctuations', value: t.kT, unit: t.energyUnit, secondValue: t.kTUncertainty, secondUnit: t.energyUnit, note: t.usableBins > 0 ? `${t.usableBins} bins of ${t.binSites.toPrecision(3)} sites, ${t.shotCount} shots` : `no temperature: no radial bin of ${t.binSites.toPrecision(3)} sites was usable (${t.shotCount} shots)` },
        { label: 'kT from the fit', value: t.fittedKT, unit: t.energyUnit },
        { label: 'consistency of the bins', value: t.chiSquare, note: `chi-square for ${t.degreesOfFreedom} degrees of freedom` },
      ],
      unitSystems: { first: 'value', second: '± uncertainty' },
    },
    { kind: 'paragraph', text: `Method: ${t.method}. Table: thermometry.csv.` },
  ];
}

export function buildCompareReport(c: CompareFit, inputs: CompareReportInputs): ReportDocument {
  const { scenario, raw } = c.prepared;
  const unit = c.optics.lengthUnit;
  const image = sourceShortName(inputs.imagePath);
  const figure = (file: string, caption?: string): ReportBlock | undefined => {
    const img = inputs.images.find((i) => i.file === file);
    return img === undefined ? undefined : { kind: 'figure', svg: img.svg, caption: caption ?? img.title };
  };
  const shown = new Set(['images/profiles.png', 'images/equation_of_state.png', 'images/thermometry.png']);
  const provenance = inputs.provenance;
  const shots = provenance?.shots;
  const sections: ReportSection[] = [
    fitSection(c),
    { heading: 'Pictures', blocks: inputs.images.filter((img) => !shown.has(img.file)).map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })) },
    {
      heading: 'Radial profiles',
      blocks: [figure('images/profiles.png', `Annular bins of ${c.binUm} ${unit.short} of the trap-scaled radius about the fitted trap centre (the figure of images/profiles.png; table profiles.csv).`)].filter(
        (b): b is ReportBlock => b !== undefined,
      ),
    },
    { heading: 'Equation of state', blocks: eosBlocks(inputs.eos, figure('images/equation_of_state.png')) },
    { heading: 'Fluctuation thermometry', blocks: thermometryBlocks(inputs.thermometry, figure('images/thermometry.png')) },
  ];
  if (shots !== undefined && shots.perShot.length >= 2) {
    const a = shots.stack.atoms;
    sections.push({
      heading: 'Shots',
      blocks: [
        {
          kind: 'keyValueTable',
          rows: [
            { label: 'shots', value: shots.perShot.length },
            { label: 'atoms per shot (pixels used in every shot)', value: a.mean, secondValue: a.std, note: `standard error of the mean ${a.standardError.toPrecision(3)}; from ${a.min.toPrecision(5)} to ${a.max.toPrecision(5)}` },
          ],
          unitSystems: { first: 'mean', second: 'shot-to-shot spread' },
        },
        {
          kind: 'table',
          caption: 'Per shot (shots.csv also holds each shot\'s parameters, linearised about the fit of the mean picture)',
          columns: [{ header: 'shot' }, { header: 'source', align: 'left' }, { header: 'atoms' }],
          rows: shots.perShot.slice(0, 200).map((s, k) => [k, s.label, s.atoms]),
        },
      ],
    });
  }
  const settings: KeyValueRow[] = [
    { label: 'measured', value: inputs.imagePath, note: provenance?.format ?? '' },
    ...(shots !== undefined ? [{ label: 'turned into atoms', value: shots.method }] : []),
    { label: 'frames as given', value: shots !== undefined ? `${shots.map.givenWidth} x ${shots.map.givenHeight} pixels` : '', note: 'columns x rows, row 0 at the top' },
    { label: 'fitted picture', value: `${c.measured.nx} x ${c.measured.ny} pixels`, note: `${c.measured.usedPixels} used` },
    { label: 'object-plane pixel', value: c.measured.pixelUm, unit: unit.short },
    { label: 'PSF sigma of the scenario', value: c.optics.psfSigmaUm, unit: unit.short, note: c.optics.psfSource },
    { label: 'length unit', value: unit.note },
  ];
  const prep = provenance?.preparation;
  if (prep !== undefined) {
    const o = prep.orientation;
    const steps = [
      ...(prep.region?.rectangle !== undefined ? [`crop to x0=${prep.region.rectangle.x0}, y0=${prep.region.rectangle.y0}, ${prep.region.rectangle.width} x ${prep.region.rectangle.height}`] : []),
      ...(prep.backgroundBorderPixels !== undefined ? [`background plane on a ${prep.backgroundBorderPixels}-pixel border`] : []),
      ...(o.transpose ? ['transposed'] : []),
      ...(o.flipColumns ? ['mirrored left-right'] : []),
      ...(o.flipRows ? ['mirrored top-bottom'] : []),
      ...((o.rotateDeg ?? 0) !== 0 ? [`rotated ${o.rotateDeg}° counter-clockwise`] : []),
    ];
    settings.push({ label: 'orientation and clean-up', value: steps.length > 0 ? steps.join(', ') : 'as given', note: prep.hotPixels ? 'hot pixels replaced' : '' });
  }
  return {
    title: `tiercake compare — ${scenario.name}`,
    subtitle: `${image} against scenario ${scenario.name}`,
    createdIso: inputs.createdIso,
    status: compareStatus(c, provenance?.warnings ?? c.warnings),
    sections: [
      ...sections,
      { heading: 'Settings', blocks: [{ kind: 'keyValueTable', rows: settings }] },
      { heading: 'Scenario', blocks: [{ kind: 'codeBlock', caption: 'The scenario as given (overrides applied)', code: JSON.stringify(raw, null, 2) }] },
    ],
    footer: `tiercake ${inputs.toolVersion}`,
  };
}
