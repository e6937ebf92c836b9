// The report document of an `evolve` run: the verdict and the warnings on top, the ramps
// (quenches named), the evolution as plots and an animation, the snapshots, the
// adiabaticity verdict shell by shell, the modulation spectrum with its mean-field caveat,
// the integrator's statistics and the cautions of time-dependent mean field.

import type { CautionItem, KeyValueRow, ReportBlock, ReportDocument, StatusLine } from './reportModel.js';
import { MEAN_FIELD_CAUTION } from './cautions.js';
import type { EvolveArtifacts } from '../pipeline/evolveScenario.js';
import { energyUnitOf, MODULATION_CAVEAT } from '../output/evolveOutputs.js';
import type { WrittenImage } from '../output/solveOutputs.js';
import { toolVersion } from '../output/toolVersion.js';

export const DYNAMICS_CAUTIONS: CautionItem[] = [
  {
    title: 'Time-dependent mean field',
    text:
      'The evolution keeps a product of site states (time-dependent Gutzwiller equations). It has no entanglement between sites, so it misses ' +
      'the spreading of correlations after a quench and the slow, correlated dynamics near the transition; a ramp that looks adiabatic here ' +
      'can still heat a real cloud. In mean field the gap closes at the transition, so adiabaticity there is reached only algebraically in the ramp time.',
  },
  {
    title: 'Mott shells are frozen in mean field',
    text:
      'A site with phi = 0 is an exact stationary state of these equations for any J(t): a Mott shell that forms during a ramp keeps its defects, and ' +
      'a Mott shell does not absorb lattice modulation at U. Defects and absorption come from the superfluid parts of the cloud.',
  },
  { title: 'Modulation spectrum', text: MODULATION_CAVEAT },
  {
    title: 'Closed system, T = 0 start',
    text:
      'The evolution conserves the atom number (the chemical potential is only a phase) and starts from the T = 0 ground state; it has no losses, ' +
      'no heating by spontaneous emission and no thermal start.',
  },
  MEAN_FIELD_CAUTION,
];

const fmt = (x: number, digits = 4): string => (Number.isFinite(x) ? Number(x.toPrecision(digits)).toString() : String(x));

export function buildEvolveReport(a: EvolveArtifacts, images: WrittenImage[], frames: Array<{ svg: string; label: string }>, createdIso: string): ReportDocument {
  const { plan, verdict, start, reference, result } = a;
  const scenario = a.prepared.scenario;
  const e = energyUnitOf(a);
  const t = plan.timeUnit;
  const status: StatusLine[] = [];
  if (a.status === 'failed') status.push({ level: 'error', text: `INTEGRATION FAILED at t = ${fmt(result.time)} ${t}: ${result.message}. The rows up to there are written; no verdict.` });
  if (!start.outcome.converged) status.push({ level: 'error', text: 'The initial ground state did not converge: the start is not stationary; read the evolution with care.' });
  if (verdict) {
    const words = `excess energy ${fmt(verdict.excessEnergyPerAtomInScale, 3)} U per atom (threshold ${verdict.excessEnergyThresholdU} U)`;
    status.push(
      verdict.adiabaticOverall
        ? { level: 'ok', text: `Adiabatic: the final state is close to the ground state at the final parameters; ${words}.` }
        : { level: 'warning', text: `Not adiabatic: ${words}${verdict.defectCriterion ? '' : `; a Mott shell keeps more than ${verdict.excessDefectsThreshold} excess defects per site`}.` },
    );
  }
  for (const w of a.warnings) status.push({ level: 'warning', text: `${w.code}: ${w.message}` });

  const rampRows = plan.ramps.map((r) => [
    r.path,
    r.shape,
    r.points.map((p) => `(${fmt(p[0])}, ${fmt(p[1])})`).join(' '),
    r.unit,
    r.staticValue.map((v) => fmt(v)).join(', '),
    r.quenchAtStart ? `yes: jumps to ${fmt(r.valueAtStart)} at t = 0` : 'no',
  ]);
  const setupBlocks: ReportBlock[] = [
    {
      kind: 'keyValueTable',
      rows: [
        { label: 'duration', value: plan.duration, unit: t },
        { label: 'time unit', value: plan.timeUnitNote },
        { label: 'output rows', value: plan.outputTimes.length },
        { label: 'integrator', value: plan.integrator.kind, note: plan.integrator.kind === 'dormand-prince' ? `tolerances ${plan.integrator.absoluteTolerance} abs, ${plan.integrator.relativeTolerance} rel` : `step ${plan.integrator.step} ${t}, order ${plan.integrator.order ?? 2}` },
        { label: 'start', value: 'ground state of the scenario at T = 0', note: `${fmt(start.outcome.solve.totals.atoms, 6)} atoms, nmax ${start.outcome.model.nmax}` },
        ...(plan.modulation
          ? [{ label: 'modulation', value: `${plan.modulation.path} × (1 + ${plan.modulation.relativeAmplitude} sin 2πf(t − ${fmt(plan.modulation.start)}))`, note: `h f = ${plan.modulation.frequency} in the energy unit, on until ${fmt(plan.modulation.end)} ${t}` } as KeyValueRow]
          : []),
      ],
    },
  ];
  if (rampRows.length > 0) {
    setupBlocks.push({
      kind: 'table',
      caption: `Ramps (times in ${t}). A first value other than the static one is a sudden quench at t = 0 from the static ground state.`,
      columns: [{ header: 'key' }, { header: 'shape' }, { header: 'points (t, value)' }, { header: 'unit' }, { header: 'static value' }, { header: 'quench at t = 0' }],
      rows: rampRows,
    });
  } else {
    setupBlocks.push({ kind: 'paragraph', text: 'No ramps: every parameter keeps its static value.' });
  }

  const plots = images.filter((img) => img.file.startsWith('images/evolution_'));
  const snapshots = images.filter((img) => /_s\d\d\.png$/.test(img.file));
  const spectrumImages = images.filter((img) => img.file.startsWith('images/spectrum'));
  const last = a.series.time.length - 1;
  const s = a.series;
  const totalsRows: KeyValueRow[] =
    last >= 0
      ? [
          { label: 'energy at the start', value: s.energy[0], unit: e },
          { label: 'energy at the end', value: s.energy[last], unit: e },
          { label: 'atoms (start, end)', value: `${fmt(s.atoms[0], 10)}, ${fmt(s.atoms[last], 10)}` },
          { label: 'condensed atoms (start, end)', value: `${fmt(s.condensedAtoms[0])}, ${fmt(s.condensedAtoms[last])}` },
          { label: 'visibility (start, end)', value: `${fmt(s.visibility[0], 3)}, ${fmt(s.visibility[last], 3)}` },
          { label: 'doublons (start, end)', value: `${fmt(s.doublons[0])}, ${fmt(s.doublons[last])}` },
        ]
      : [];

  const verdictBlocks: ReportBlock[] = [];
  if (verdict) {
    verdictBlocks.push(
      {
        kind: 'paragraph',
        text:
          'The final state is compared with the ground state at the final parameters with the same atom number (the evolution conserves N). ' +
          `The verdict is "adiabatic" when the excess energy per atom is at most ${verdict.excessEnergyThresholdU} U and every Mott shell of that ground state ` +
          `has at most ${verdict.excessDefectsThreshold} excess defects per site; both thresholds are choices (evolution.verdict), not laws.`,
      },
      {
        kind: 'keyValueTable',
        rows: [
          { label: 'verdict', value: verdict.adiabaticOverall ? 'adiabatic' : 'not adiabatic' },
          { label: 'excess energy per atom', value: verdict.excessEnergyPerAtom, unit: e, secondValue: verdict.excessEnergyPerAtomInScale, secondUnit: 'U' },
          { label: 'final energy, reference energy', value: `${fmt(verdict.energy, 8)}, ${fmt(verdict.groundEnergy, 8)}`, unit: e },
          { label: 'mean site infidelity', value: verdict.meanInfidelity, note: '1 − |<ground|site>|², occupied sites, best global condensate phase' },
          { label: 'largest site infidelity', value: verdict.maxInfidelity },
        ],
      },
    );
    if (verdict.shells.length > 0) {
      verdictBlocks.push({
        kind: 'table',
        caption: 'Defects per Mott shell of the reference ground state: 1 − P(filling) summed over the shell, in the final state and in the reference.',
        columns: [
          { header: 'filling' },
          { header: 'sites' },
          { header: 'defects (final)' },
          { header: 'defects (reference)' },
          { header: 'excess per site' },
          { header: 'holes (final)' },
          { header: 'holes (reference)' },
        ],
        rows: verdict.shells.map((sh) => [sh.filling, sh.sites, sh.defects, sh.groundDefects, sh.excessDefectsPerSite, sh.holes, sh.groundHoles]),
      });
    } else {
      verdictBlocks.push({ kind: 'paragraph', text: 'The reference ground state has no Mott shell: the verdict rests on the excess energy alone.' });
    }
  } else {
    verdictBlocks.push({ kind: 'paragraph', text: 'No verdict: the evolution did not reach its end.' });
  }
  verdictBlocks.push({
    kind: 'keyValueTable',
    caption: 'Reference ground state (final parameters, same atom number)',
    rows: [
      { label: 'converged', value: reference.outcome.converged ? 'yes' : 'NO' },
      { label: 'atoms', value: reference.outcome.solve.totals.atoms },
      { label: 'Mott sites by filling', value: reference.classification.mottSitesByFilling.map((c, k) => (k > 0 && c > 0 ? `n=${k}: ${c}` : '')).filter(Boolean).join(', ') || 'none' },
    ],
  });

  const sections: ReportDocument['sections'] = [
    { heading: 'Set-up', blocks: setupBlocks },
    {
      heading: 'Evolution',
      blocks: [
        { kind: 'keyValueTable', rows: totalsRows },
        ...plots.map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })),
      ],
    },
  ];
  if (frames.length > 0) {
    sections.push({
      heading: 'Animation',
      blocks: [
        {
          kind: 'animation',
          frames,
          caption: `${frames.length} frames from t = 0 to the end (colour scales shared by all frames). Click a number to show a frame, "play / pause" to run them. Density and |phi|² ${a.prepared.resolved.geometry.dims === 3 ? 'summed along the camera axis' : 'per site'}.`,
        },
      ],
    });
  }
  if (snapshots.length > 0) {
    sections.push({ heading: 'Snapshots', blocks: snapshots.map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })) });
  }
  sections.push({ heading: 'Adiabaticity verdict', blocks: verdictBlocks });
  if (a.spectrum) {
    const sp = a.spectrum;
    sections.push({
      heading: 'Modulation spectrum',
      blocks: [
        {
          kind: 'paragraph',
          text:
            `From the state at the end of the evolution, ${sp.path} is modulated by a relative amplitude ${sp.relativeAmplitude} for ${fmt(sp.duration)} ${t} at each frequency ` +
            `(${sp.points.length} points, ${sp.source}); the energy absorbed is measured with the unmodulated Hamiltonian, the doublons against an unmodulated reference evolution ` +
            `(which changed the energy by ${fmt(sp.reference.energyChange, 3)} ${e} and the doublons by ${fmt(sp.reference.doublonsChange, 3)}).`,
        },
        { kind: 'cautionList', items: [{ title: 'Mean-field caveat', text: MODULATION_CAVEAT }] },
        ...spectrumImages.map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })),
      ],
    });
  }
  const st = result.statistics;
  sections.push(
    {
      heading: 'Integrator',
      blocks: [
        {
          kind: 'keyValueTable',
          rows: [
            { label: 'status', value: result.status },
            { label: 'accepted steps', value: st.steps },
            { label: 'rejected steps', value: st.rejectedSteps },
            { label: 'right-hand sides / propagations', value: st.evaluations },
            { label: 'smallest, largest step', value: `${fmt(st.smallestStep, 3)}, ${fmt(st.largestStep, 3)}`, unit: t },
            { label: 'threads', value: a.threadsUsed },
            { label: 'start, reference, evolution, spectrum', value: `${fmt(a.timings.startSeconds, 3)}, ${fmt(a.timings.referenceSeconds, 3)}, ${fmt(a.timings.evolveSeconds, 3)}, ${fmt(a.timings.spectrumSeconds, 3)}`, unit: 's' },
          ],
        },
      ],
    },
    { heading: 'Cautions', blocks: [{ kind: 'cautionList', items: DYNAMICS_CAUTIONS }] },
    { heading: 'Scenario', blocks: [{ kind: 'codeBlock', caption: 'The scenario as evolved (defaults filled in, overrides applied)', code: JSON.stringify(scenario, null, 2) }] },
  );
  return {
    title: `tiercake evolve — ${scenario.name}`,
    subtitle: scenario.description ?? `${a.prepared.resolved.geometry.dims}D lattice, ${plan.mode === 'laboratory' ? 'laboratory' : 'dimensionless'} parameters, ${fmt(plan.duration)} ${t}`,
    createdIso,
    status,
    sections,
    footer: `tiercake ${toolVersion()}`,
  };
}
