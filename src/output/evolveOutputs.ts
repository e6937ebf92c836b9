// Files of an `evolve` run, staged in one OutputFolder and committed together:
//   evolution.csv (+ evolution.csv-metadata.json, CSVW: units and meaning of every column)
//   spectrum.csv (+ spectrum.csv-metadata.json), when a modulation spectrum was run
//   snapshots/sNN/*.npy            per-site fields at the snapshot times (shape = lattice)
//   fields/reference_*.npy         the ground state at the final parameters (the verdict's reference)
//   images/*_sNN.*                 camera pictures at the snapshot times (pictureFiles.ts)
//   images/evolution_*.png, images/spectrum.png   plots
//   summary.json, report.html
// Writers take the plain results of src/pipeline/evolveScenario.ts and compute no physics.

import { encodeNpy } from '../formats/npy.js';
import { csvTable } from '../formats/csvTable.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { sideBySideSvg } from '../figures/composeSvg.js';
import type { LineSeries } from '../figures/plotSpec.js';
import type { PlanarField } from '../imaging/planarField.js';
import type { EvolveArtifacts } from '../pipeline/evolveScenario.js';
import type { EvolvePicture } from '../pipeline/evolvePictures.js';
import type { OutputFolder } from './outputFolder.js';
import { pictureFiles } from './pictureFiles.js';
import { figureImage, jsonReplacer, type WrittenImage } from './solveOutputs.js';
import { toolVersion } from './toolVersion.js';
import { toolStamp } from './recordFields.js';

/** Energy unit of the outputs: the internal unit (h·Hz in laboratory mode). */
export function energyUnitOf(a: EvolveArtifacts): string {
  return a.prepared.resolved.units.internal === 'Hz' ? 'h·Hz' : a.prepared.resolved.units.internal;
}

interface ColumnSpec {
  name: string;
  unit: string;
  meaning: string;
  values: ArrayLike<number>;
}

function evolutionColumns(a: EvolveArtifacts): ColumnSpec[] {
  const s = a.series;
  const e = energyUnitOf(a);
  const t = a.plan.timeUnit;
  const perAtom = s.condensedAtoms.map((c, k) => (s.atoms[k] > 0 ? c / s.atoms[k] : NaN));
  return [
    { name: 'time', unit: t, meaning: `time since the start, ${a.plan.timeUnitNote}`, values: s.time },
    { name: 'energy', unit: e, meaning: 'mean-field energy <H> with the Hamiltonian of that time (no chemical-potential term)', values: s.energy },
    { name: 'atoms', unit: 'atoms', meaning: 'sum_i <n_i>; conserved by the equations (its drift checks the integrator)', values: s.atoms },
    { name: 'condensed_atoms', unit: 'atoms', meaning: 'sum_i |phi_i|^2 with phi_i = <b_i> (complex)', values: s.condensedAtoms },
    { name: 'condensate_fraction', unit: '1', meaning: 'condensed_atoms / atoms', values: perAtom },
    {
      name: 'number_variance',
      unit: 'atoms^2',
      meaning: 'sum_i (<n_i^2> - <n_i>^2), the local number fluctuations: the defect measure of the Gutzwiller product state (each site is pure, so there is no entropy)',
      values: s.numberVariance,
    },
    { name: 'doublons', unit: 'sites', meaning: 'sum_i P_i(2): expected number of doubly occupied sites', values: s.doublons },
    { name: 'multiply_occupied', unit: 'sites', meaning: 'sum_i P_i(n >= 2)', values: s.multiplyOccupied },
    { name: 'holes', unit: 'sites', meaning: 'over the Mott shells of the reference ground state (filling k_i): sum_i P_i(n < k_i)', values: s.holes },
    { name: 'shell_defects', unit: 'sites', meaning: 'over the same shells: sum_i (1 - P_i(k_i)), any occupation other than the filling', values: s.shellDefects },
    {
      name: 'visibility',
      unit: '1',
      meaning: 'time-of-flight visibility (Gerbier et al., PRL 95, 050404 (2005)) of the lattice structure factor with the complex phi; NaN for a chain',
      values: s.visibility,
    },
    { name: 'hopping', unit: e, meaning: 'J along x at that time (at the trap centre where J varies)', values: s.hopping },
    { name: 'interaction', unit: e, meaning: 'U at the trap centre at that time', values: s.interaction },
    { name: 'max_top_weight', unit: '1', meaning: 'largest weight on |nmax> of any site (the truncation is doubtful above truncation.topWeightMax)', values: s.maxTopWeight },
    { name: 'max_norm_error', unit: '1', meaning: 'largest |1 - sum_n |c_{i,n}|^2| of any site', values: s.maxNormError },
    { name: 'steps', unit: 'steps', meaning: 'accepted integrator steps so far', values: s.steps },
    { name: 'rejected_steps', unit: 'steps', meaning: 'rejected integrator steps so far (adaptive integrator)', values: s.rejectedSteps },
  ];
}

function spectrumColumns(a: EvolveArtifacts): ColumnSpec[] {
  const sp = a.spectrum;
  if (!sp) return [];
  const e = energyUnitOf(a);
  const p = sp.points;
  const energyUnit = a.prepared.scenario.energyUnit ?? (a.plan.mode === 'laboratory' ? 'Hz' : 'J');
  return [
    { name: 'frequency', unit: energyUnit, meaning: 'modulation frequency as an energy h f, in the energy unit of the scenario', values: p.map((x) => x.frequency) },
    { name: 'cycles_per_time_unit', unit: `1/${a.plan.timeUnit}`, meaning: `f in cycles per ${a.plan.timeUnit}${a.plan.mode === 'laboratory' ? ' (kHz)' : ''}`, values: p.map((x) => x.cyclesPerTimeUnit) },
    { name: 'energy_absorbed', unit: e, meaning: '<H>(end) - <H>(start) with the unmodulated Hamiltonian', values: p.map((x) => x.energyAbsorbed) },
    { name: 'energy_absorbed_per_atom', unit: e, meaning: 'energy_absorbed / atoms', values: p.map((x) => x.energyAbsorbedPerAtom) },
    { name: 'doublons_created', unit: 'sites', meaning: 'sum_i P_i(2) at the end minus the same after the unmodulated reference evolution', values: p.map((x) => x.doublonsCreated) },
    { name: 'multiply_occupied_created', unit: 'sites', meaning: 'the same for P_i(n >= 2)', values: p.map((x) => x.multiplyOccupiedCreated) },
    { name: 'condensed_atoms_change', unit: 'atoms', meaning: 'sum_i |phi_i|^2 at the end minus at the start', values: p.map((x) => x.condensedAtomsChange) },
    { name: 'finished', unit: '1', meaning: '1 when the integrator reached the end, 0 when it failed', values: p.map((x) => (x.status === 'done' ? 1 : 0)) },
  ];
}

/** The CSV (header on the first line) and its W3C CSV on the Web metadata sidecar, as every table of the tool. */
function csvWithSidecar(file: string, title: string, columns: ColumnSpec[], extra: Record<string, unknown>): Array<{ file: string; text: string }> {
  const notes = Object.entries(extra).map(([key, value]) => `${key}: ${typeof value === 'string' ? value : JSON.stringify(value, jsonReplacer)}`);
  const table = csvTable(
    file,
    columns.map((c) => ({ name: c.name, values: c.values, unit: c.unit, description: c.meaning })),
    { title, description: `${title}; one row per output time, nan where a value is undefined`, creator: `tiercake ${toolVersion()}`, notes },
  );
  return [
    { file, text: table.csv },
    { file: table.metadataFile, text: table.metadata },
  ];
}

export function evolutionCsvFiles(a: EvolveArtifacts): Array<{ file: string; text: string }> {
  return csvWithSidecar('evolution.csv', `evolution of scenario ${a.prepared.scenario.name}`, evolutionColumns(a), {
    timeUnit: a.plan.timeUnitNote,
    energyUnit: energyUnitOf(a) === 'h·Hz' ? 'energy / h in Hz' : `the scenario energy unit ${energyUnitOf(a)}`,
    shellsFrom: 'holes and shell_defects count over the Mott shells of the ground state at the final parameters with the same atom number (fields/reference_mott_filling.npy)',
  });
}

export function spectrumCsvFiles(a: EvolveArtifacts): Array<{ file: string; text: string }> {
  if (!a.spectrum) return [];
  return csvWithSidecar('spectrum.csv', `modulation spectrum of scenario ${a.prepared.scenario.name}`, spectrumColumns(a), {
    modulated: a.spectrum.path,
    relativeAmplitude: a.spectrum.relativeAmplitude,
    durationPerPoint: `${a.spectrum.duration} ${a.plan.timeUnit}`,
    start: 'the state at the end of the evolution, under the Hamiltonian of the end of the evolution',
    caveat: MODULATION_CAVEAT,
  });
}

export const MODULATION_CAVEAT =
  'single-site mean field: a Gutzwiller Mott site with phi = 0 is an exact stationary state for any J(t), so a Mott shell absorbs nothing at U; ' +
  'the absorption comes from the superfluid parts of the cloud. The peak near U that experiments see (Stoferle et al., PRL 92, 130403 (2004)) ' +
  'comes from particle-hole excitations of the insulator, which this ansatz lacks.';

const snapshotName = (index: number): string => `s${String(index).padStart(2, '0')}`;

export function snapshotFieldFiles(a: EvolveArtifacts): Array<{ file: string; bytes: Uint8Array }> {
  const shape = a.prepared.resolved.geometry.shape;
  const out: Array<{ file: string; bytes: Uint8Array }> = [];
  for (const s of a.snapshots) {
    const f = s.fields;
    const abs = f.condensateDensity.map(Math.sqrt);
    const list: Array<[string, Float64Array]> = [
      ['density', f.density],
      ['order_parameter_abs', abs],
      ['order_parameter_re', f.phiRe],
      ['order_parameter_im', f.phiIm],
      ['parity_odd', f.parityOdd],
      ['doublon_probability', f.doubleProbability],
      ['number_variance', f.numberVariance],
    ];
    for (const [name, data] of list) out.push({ file: `snapshots/${snapshotName(s.index)}/${name}.npy`, bytes: encodeNpy(data, shape) });
  }
  const ref = a.reference;
  out.push({ file: 'fields/reference_density.npy', bytes: encodeNpy(ref.fields.density, shape) });
  out.push({ file: 'fields/reference_order_parameter.npy', bytes: encodeNpy(ref.fields.orderParameter, shape) });
  out.push({ file: 'fields/reference_mott_filling.npy', bytes: encodeNpy(ref.classification.mottFilling, shape) });
  return out;
}

function snapshotPictureFiles(a: EvolveArtifacts): ReturnType<typeof pictureFiles>[] {
  const out: ReturnType<typeof pictureFiles>[] = [];
  for (const s of a.snapshots) {
    for (const p of s.pictures) {
      out.push(
        pictureFiles(p.picture, {
          name: `${p.kind}_${snapshotName(s.index)}`,
          title: p.title,
          description: p.description,
          quantity: p.quantity,
          axisNames: p.axisNames,
          lengthUnit: p.lengthUnit,
          ...(p.axisNote !== undefined ? { axisNote: p.axisNote } : {}),
          ...(p.colorMap !== undefined ? { colorMap: p.colorMap } : {}),
          extra: { time: s.time, timeUnit: a.plan.timeUnit },
        }),
      );
    }
  }
  return out;
}

/** The plots of the evolution (energy, condensate and visibility, defects, parameters). */
export function evolutionPlots(a: EvolveArtifacts): WrittenImage[] {
  const s = a.series;
  const name = a.prepared.scenario.name;
  const e = energyUnitOf(a);
  const x = { label: 'time', unit: a.plan.timeUnit };
  const images: WrittenImage[] = [];
  const n0 = s.atoms[0] > 0 ? s.atoms[0] : 1;
  images.push(
    figureImage(
      'images/evolution_energy.png',
      'Energy per atom',
      renderLinePlotSvg({ title: `${name}: energy per atom`, xAxis: x, yAxis: { label: 'energy per atom', unit: e }, series: [{ label: '<H>/N', x: s.time, y: s.energy.map((v) => v / n0) }] }),
    ),
  );
  const coherence: LineSeries[] = [{ label: 'condensate fraction', x: s.time, y: s.condensedAtoms.map((c, k) => c / (s.atoms[k] || 1)) }];
  if (s.visibility.some((v) => Number.isFinite(v))) coherence.push({ label: 'visibility', x: s.time, y: s.visibility, style: { line: 'dashed' } });
  images.push(
    figureImage('images/evolution_coherence.png', 'Condensate fraction and visibility', renderLinePlotSvg({ title: `${name}: coherence`, xAxis: x, yAxis: { label: 'fraction' }, series: coherence })),
  );
  const defects: LineSeries[] = [
    { label: 'doublons', x: s.time, y: s.doublons },
    { label: 'number variance', x: s.time, y: s.numberVariance, style: { line: 'dashed' } },
  ];
  if (s.holes.some((v) => Number.isFinite(v) && v > 0) || s.shellDefects.some((v) => Number.isFinite(v) && v > 0)) {
    defects.push({ label: 'holes in the final shells', x: s.time, y: s.holes, style: { line: 'dotted' } }, { label: 'shell defects', x: s.time, y: s.shellDefects });
  }
  images.push(figureImage('images/evolution_defects.png', 'Doublons, fluctuations and shell defects', renderLinePlotSvg({ title: `${name}: defects`, xAxis: x, yAxis: { label: 'sites' }, series: defects })));
  const logHopping = s.hopping.every((v) => v > 0) && Math.max(...s.hopping) / Math.min(...s.hopping) > 20;
  images.push(
    figureImage(
      'images/evolution_parameters.png',
      'J and U during the evolution',
      renderLinePlotSvg({
        title: `${name}: J and U`,
        xAxis: x,
        yAxis: { label: 'energy', unit: e, log: logHopping },
        series: [
          { label: 'hopping J', x: s.time, y: s.hopping },
          { label: 'interaction U', x: s.time, y: s.interaction, style: { line: 'dashed' } },
        ],
      }),
    ),
  );
  if (a.spectrum) {
    const p = a.spectrum.points;
    const unit = a.prepared.scenario.energyUnit ?? (a.plan.mode === 'laboratory' ? 'Hz' : 'J');
    const fU = a.verdict ? a.verdict.finalInteraction : NaN;
    const uInUnit = a.plan.cyclesOf(1) > 0 ? (a.plan.rate * fU) / (2 * Math.PI) / a.plan.cyclesOf(1) : NaN;
    // Both spectrum plots: one reading against the modulation frequency, U marked where it is known.
    const againstFrequency = (file: string, caption: string, title: string, yAxis: { label: string; unit?: string }, label: string, y: (q: (typeof p)[number]) => number): WrittenImage =>
      figureImage(
        file,
        caption,
        renderLinePlotSvg({
          title: `${name}: ${title}`,
          xAxis: { label: 'modulation frequency h f', unit },
          yAxis,
          series: [{ label, x: p.map((q) => q.frequency), y: p.map(y), style: { marker: 'circle' } }],
          ...(Number.isFinite(uInUnit) ? { verticalMarkers: [{ at: uInUnit, label: 'U' }] } : {}),
        }),
      );
    images.push(againstFrequency('images/spectrum.png', 'Modulation spectrum', 'modulation spectrum', { label: 'per atom', unit: e }, 'energy absorbed per atom', (q) => q.energyAbsorbedPerAtom));
    images.push(againstFrequency('images/spectrum_doublons.png', 'Doublons created against frequency', 'doublons created', { label: 'sites' }, 'doublons created', (q) => q.doublonsCreated));
  }
  return images;
}

function maxOf(fields: PlanarField[]): number {
  let m = 0;
  for (const f of fields) for (let i = 0; i < f.values.length; i++) if (f.values[i] > m) m = f.values[i];
  return m > 0 ? m : 1;
}

/** The animation frames as SVG (shared colour scales over all frames). */
export function animationFrameSvgs(a: EvolveArtifacts): Array<{ svg: string; label: string }> {
  const frames = a.frames;
  if (frames.length === 0) return [];
  const dims = a.prepared.resolved.geometry.shape.length;
  const lengthNote = 'sites';
  const densityMax = maxOf(frames.map((f) => f.density));
  const condensateMax = maxOf(frames.map((f) => f.condensate));
  const far = frames.map((f) => f.farField).filter((p): p is EvolvePicture => p !== null);
  const farMax = far.length > 0 ? maxOf(far.map((p) => p.picture)) : 1;
  const label = (t: number): string => `t = ${Number(t.toPrecision(5))} ${a.plan.timeUnit}`;
  const column = dims === 3 ? ' (column)' : '';
  return frames.map((f) => {
    if (dims === 1) {
      const xs = Array.from({ length: f.density.nx }, (_, i) => i);
      return {
        label: label(f.time),
        svg: renderLinePlotSvg({
          title: label(f.time),
          xAxis: { label: 'x', unit: 'sites' },
          yAxis: { label: 'atoms per site', min: 0, max: Math.max(densityMax, condensateMax) * 1.05 },
          series: [
            { label: 'density n', x: xs, y: f.density.values },
            { label: 'condensate |phi|²', x: xs, y: f.condensate.values, style: { line: 'dashed' } },
          ],
          widthPx: 560,
          heightPx: 320,
        }),
      };
    }
    const map = (field: PlanarField, title: string, max: number, colorMap?: string): string =>
      renderFieldMapSvg({
        values: field.values,
        nx: field.nx,
        ny: field.ny,
        title,
        xAxis: { label: `x (${lengthNote})` },
        yAxis: { label: `y (${lengthNote})` },
        valueRange: { min: 0, max },
        colorBarLabel: 'atoms per site',
        minImagePx: 220,
        ...(colorMap ? { colorMap } : {}),
      });
    const panels = [map(f.density, `density${column}`, densityMax), map(f.condensate, `condensate |phi|²${column}`, condensateMax, 'glacier')];
    if (f.farField) {
      // interference peaks are a few pixels wide and fade as the cloud dephases: a log scale
      // over three decades, shared by all frames, keeps them and the background visible
      const p = f.farField.picture;
      const unit = f.farField.lengthUnit.short;
      const note = f.farField.axisNote ?? '';
      panels.push(
        renderFieldMapSvg({
          values: p.values,
          nx: p.nx,
          ny: p.ny,
          title: f.farField.kind === 'time_of_flight' ? 'time of flight (log scale)' : 'momentum distribution (log scale)',
          xAxis: { label: `${f.farField.axisNames[0]}${note} (${unit})`, origin: p.xCentresUm[0], step: p.pixelUm },
          yAxis: { label: `${f.farField.axisNames[1]}${note} (${unit})`, origin: p.yCentresUm[0], step: p.pixelUm },
          colorMap: 'glacier',
          colorScale: 'log',
          valueRange: { min: farMax * 1e-3, max: farMax },
          colorBarLabel: f.farField.quantity,
          minImagePx: 220,
          maxImagePx: 260,
        }),
      );
    }
    return { label: label(f.time), svg: sideBySideSvg(panels, `${a.prepared.scenario.name}, ${label(f.time)}`) };
  });
}

/** The machine-readable summary. */
export function buildEvolveSummary(a: EvolveArtifacts, files: string[]): Record<string, unknown> {
  const { plan, start, reference, verdict, result } = a;
  const resolved = a.prepared.resolved;
  return {
    tool: toolStamp(),
    command: 'evolve',
    scenario: a.prepared.scenario,
    mode: resolved.mode,
    status: a.status,
    trustworthy: a.trustworthy,
    warnings: a.warnings,
    units: {
      time: plan.timeUnitNote,
      energy: energyUnitOf(a) === 'h·Hz' ? 'energy / h in Hz' : `the scenario energy unit ${energyUnitOf(a)}`,
      equationsOfMotion: `i dc/dt = rate H c with rate = ${plan.rate} per ${plan.timeUnit} and energy unit`,
    },
    evolution: {
      duration: plan.duration,
      outputTimes: plan.outputTimes.length,
      snapshotTimes: plan.snapshotTimes,
      animationFrameTimes: plan.frameTimes,
      integrator: plan.integrator,
      ramps: plan.ramps,
      quenchAtStart: plan.quenches.map((q) => q.path),
      modulation: plan.modulation,
      result: { status: result.status, message: result.message, timeReached: result.time, statistics: result.statistics },
    },
    start: {
      description: 'Gutzwiller ground state of the scenario at T = 0 (the static parameters)',
      converged: start.outcome.converged,
      nmax: start.outcome.model.nmax,
      chemicalPotential: start.outcome.solve.mu,
      atoms: start.outcome.solve.totals.atoms,
      energy: start.outcome.solve.totals.freeEnergy,
      maxOrderResidual: start.amplitudes.maxOrderResidual,
      sweeps: start.outcome.totalSweeps,
      mottSitesByFilling: start.classification.mottSitesByFilling,
    },
    reference: {
      description: 'ground state at the parameters of the end of the evolution with the atom number of the start (the verdict compares with it)',
      converged: reference.outcome.converged,
      chemicalPotential: reference.outcome.solve.mu,
      atoms: reference.outcome.solve.totals.atoms,
      energy: reference.outcome.solve.totals.freeEnergy,
      mottSitesByFilling: reference.classification.mottSitesByFilling,
    },
    verdict:
      verdict === null
        ? null
        : {
            adiabatic: verdict.adiabaticOverall,
            meaning:
              'adiabatic: the excess energy per atom over the reference ground state is at most excessEnergyThresholdU x U(final) and every Mott shell of the reference ' +
              'has at most excessDefectsThreshold excess defects per site; thresholds are choices, not laws',
            excessEnergyPerAtom: verdict.excessEnergyPerAtom,
            excessEnergyPerAtomU: verdict.excessEnergyPerAtomInScale,
            excessEnergyThresholdU: verdict.excessEnergyThresholdU,
            excessDefectsThreshold: verdict.excessDefectsThreshold,
            energyCriterion: verdict.energyCriterion,
            defectCriterion: verdict.defectCriterion,
            finalInteraction: verdict.finalInteraction,
            energy: verdict.energy,
            referenceEnergy: verdict.groundEnergy,
            atoms: verdict.atoms,
            referenceAtoms: verdict.groundAtoms,
            meanSiteInfidelity: verdict.meanInfidelity,
            maxSiteInfidelity: verdict.maxInfidelity,
            condensatePhaseShift: verdict.condensatePhaseShift,
            shells: verdict.shells,
          },
    spectrum: a.spectrum
      ? {
          path: a.spectrum.path,
          relativeAmplitude: a.spectrum.relativeAmplitude,
          duration: a.spectrum.duration,
          source: a.spectrum.source,
          reference: a.spectrum.reference,
          caveat: MODULATION_CAVEAT,
          points: a.spectrum.points,
        }
      : null,
    snapshots: a.snapshots.map((s) => ({ index: s.index, time: s.time, folder: `snapshots/${snapshotName(s.index)}`, pictures: s.pictures.map((p) => `images/${p.kind}_${snapshotName(s.index)}`) })),
    threads: a.threadsUsed,
    timings: a.timings,
    files,
  };
}

/** Stage every file of an evolve run in `folder` (the caller commits it). */
export function writeEvolveFiles(
  a: EvolveArtifacts,
  folder: OutputFolder,
  reportHtml: (images: WrittenImage[], frames: Array<{ svg: string; label: string }>) => string,
): string[] {
  const files: string[] = [];
  const put = (file: string, data: string | Uint8Array): void => {
    folder.write(file, data);
    files.push(file);
  };
  for (const t of evolutionCsvFiles(a)) put(t.file, t.text);
  for (const t of spectrumCsvFiles(a)) put(t.file, t.text);
  for (const f of snapshotFieldFiles(a)) put(f.file, f.bytes);
  const images = evolutionPlots(a);
  for (const img of images) put(img.file, img.png);
  for (const p of snapshotPictureFiles(a)) {
    for (const f of p.arrays) put(f.file, f.bytes);
    for (const t of p.texts) put(t.file, t.text);
    put(p.image.file, p.image.png);
    images.push(p.image);
  }
  files.push('summary.json', 'report.html');
  folder.write('summary.json', `${JSON.stringify(buildEvolveSummary(a, files), jsonReplacer, 2)}\n`);
  folder.write('report.html', reportHtml(images, animationFrameSvgs(a)));
  return files;
}
