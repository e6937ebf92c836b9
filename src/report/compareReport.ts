// The report of `tiercake compare`: status (did the fit and the solve at the best values
// converge, did a parameter end on its bound), the best values with their uncertainties,
// the pictures, the radial profiles, the settings and the scenario as given. Builds the
// document model only (reportModel.ts); renderReport.ts turns it into HTML.

import type { CompareFit } from '../pipeline/compareFit.js';
import type { KeyValueRow, ReportDocument, StatusLine } from './reportModel.js';

export interface CompareReportInputs {
  imagePath: string;
  /** colour PNGs to show, in order */
  images: ReadonlyArray<{ file: string; title: string; svg: string; png: Uint8Array }>;
  createdIso: string;
  toolVersion: string;
}

function baseName(path: string): string {
  const parts = path.split(/[\\/]/);
  return parts[parts.length - 1] ?? path;
}

export function compareStatus(c: CompareFit): StatusLine[] {
  const status: StatusLine[] = [];
  if (!c.best.converged) status.push({ level: 'error', text: 'The solve at the best-fit values did NOT converge; the fit must not be trusted.' });
  status.push(
    c.fit.converged
      ? { level: 'ok', text: `Fit converged (${c.fit.message}) after ${c.fit.iterations} steps and ${c.fit.solves} solves.` }
      : { level: 'warning', text: `Fit stopped before convergence (${c.fit.message}); raise --max-iterations.` },
  );
  for (const p of c.parameters) {
    if (p.atBound) status.push({ level: 'warning', text: `${p.name} ended on its bound; its uncertainty is not meaningful.` });
  }
  return status;
}

export function buildCompareReport(c: CompareFit, inputs: CompareReportInputs): ReportDocument {
  const { scenario, raw } = c.prepared;
  const unit = c.optics.lengthUnit;
  const image = baseName(inputs.imagePath);
  const labels: Record<string, string> = {
    atoms: 'atom number N',
    kT: 'temperature k_B T',
    centreXPixels: `trap centre along ${c.axisNames[0]}`,
    centreYPixels: `trap centre along ${c.axisNames[1]}`,
  };
  const fitRows: KeyValueRow[] = c.parameters.map((r) => ({
    label: labels[r.name] ?? r.name,
    value: r.best,
    unit: r.name === 'atoms' ? '' : r.unit,
    secondValue: r.uncertainty,
    secondUnit: r.name === 'atoms' ? '' : r.unit,
    note: `start ${r.start.toPrecision(5)}${r.atBound ? ', on its bound' : ''}`,
  }));
  fitRows.push(
    { label: 'reduced chi-square', value: c.fit.reducedChiSquare, note: `${c.fit.degreesOfFreedom} degrees of freedom` },
    { label: 'solves', value: c.fit.solves },
    { label: 'background subtracted', value: c.background, unit: 'atoms per pixel' },
    { label: 'measured cloud centre', value: `(${c.measuredCentre.centre[0].toFixed(2)}, ${c.measuredCentre.centre[1].toFixed(2)})`, note: 'pixels' },
    { label: 'model cloud centre', value: `(${c.modelCentre.centre[0].toFixed(2)}, ${c.modelCentre.centre[1].toFixed(2)})`, note: 'pixels' },
  );
  const radius = Array.from(c.profile.meanRadius);
  return {
    title: `tiercake compare — ${scenario.name}`,
    subtitle: `${image} against scenario ${scenario.name}`,
    createdIso: inputs.createdIso,
    status: compareStatus(c),
    sections: [
      {
        heading: 'Fit',
        blocks: [
          { kind: 'keyValueTable', caption: 'Best values (second column: standard uncertainty from the noise model, enlarged by √χ²_ν when χ²_ν > 1)', unitSystems: { first: 'best', second: '± uncertainty' }, rows: fitRows },
          { kind: 'paragraph', text: `Weights: ${c.noise.description}.` },
        ],
      },
      {
        heading: 'Pictures',
        blocks: inputs.images.filter((img) => img.file !== 'images/profiles.png').map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })),
      },
      {
        heading: 'Radial profiles',
        blocks: inputs.images
          .filter((img) => img.file === 'images/profiles.png')
          .map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: `Annular bins of ${c.binUm} ${unit.short} about the measured cloud centre (the same figure as images/profiles.png).` })),
      },
      {
        heading: 'Settings',
        blocks: [
          {
            kind: 'keyValueTable',
            rows: [
              { label: 'image', value: inputs.imagePath, note: c.measured.format },
              { label: 'orientation', value: `${c.measured.flipX ? 'mirrored, ' : ''}rotated ${c.measured.rotateDeg}°` },
              { label: 'object-plane pixel', value: c.measured.pixelUm, unit: unit.short },
              { label: 'counts per atom', value: c.measured.countsPerAtom },
              { label: 'PSF sigma', value: c.optics.psfSigmaUm, unit: unit.short, note: c.optics.psfSource },
              { label: 'length unit', value: unit.note },
            ],
          },
        ],
      },
      { heading: 'Scenario', blocks: [{ kind: 'codeBlock', caption: 'The scenario as given (overrides applied)', code: JSON.stringify(raw, null, 2) }] },
    ],
    footer: `tiercake ${inputs.toolVersion}`,
  };
}
