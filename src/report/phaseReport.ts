// The report's account of the phase labels: the Mott shells with their radii, their
// proximity-induced coherence and (T > 0) their thermal fluctuations beside the atomic-limit
// expectation; the atoms per phase; the rules and thresholds used, each with its reason;
// where the local-density-approximation label disagrees; and the spanning rule. Plain text
// for a reader who wants to know why a site got its label.

import type { ReportBlock, CellValue } from './reportModel.js';
import { phaseNames, phaseTitles } from '../observables/phaseCodes.js';
import { thresholdReasons, type PhaseThresholds } from '../observables/phaseThresholds.js';
import type { SiteClassification } from '../observables/siteClassification.js';
import type { ShellSummary } from '../observables/shellSummary.js';

import type { StatusLine } from './reportModel.js';
import { shellRadiusNote, type RadialFrame } from '../observables/radialFrame.js';

export interface PhaseReportInput {
  classification: SiteClassification;
  shells: ShellSummary;
  /** lattice spacing in µm (laboratory mode), else null: radii in sites */
  latticeSpacingUm: number | null;
  /** U in the energy unit of kT (for kT/U) */
  interaction: number;
  /** what the radii measure (radialFrame.ts); 'none' leaves them out */
  radialFrame: RadialFrame;
}

const pct = (x: number): string => `${(100 * x).toPrecision(2)} %`;

/** The blocks of the "Shells and phases" section. */
export function phaseReportBlocks(input: PhaseReportInput): ReportBlock[] {
  const { classification: c, shells, latticeSpacingUm: spacing } = input;
  const scale = spacing ?? 1;
  const radiusUnit = spacing !== null ? 'µm' : 'sites';
  const thermal = c.temperature > 0;
  const statsByFilling = new Map(c.shellStatistics.map((s) => [s.filling, s]));

  const withRadii = input.radialFrame !== 'none';
  const shellRows: CellValue[][] = shells.shells.map((s) => {
    const st = statsByFilling.get(s.filling);
    return [
      `n = ${s.filling}`,
      s.sites,
      s.atoms,
      withRadii ? s.innerRadius * scale : null,
      withRadii ? s.outerRadius * scale : null,
      st ? st.meanCondensateFraction : null,
      st ? st.maxCondensateFraction : null,
      st ? st.coherentSites : null,
    ];
  });
  const blocks: ReportBlock[] = [
    {
      kind: 'table',
      caption:
        `Mott shells: the sites labelled Mott insulator of each filling. ${shellRadiusNote(input.radialFrame)} ` +
        'Proximity-induced coherence: the condensate fraction |φ|²/n that the neighbouring superfluid induces inside the shell (mean, largest) and the shell sites with |φ|² above ' +
        `${c.thresholds.condensateMin}; it is reported, not used to erase the shell.`,
      columns: [
        { header: 'shell' },
        { header: 'sites' },
        { header: 'atoms' },
        { header: 'inner radius', unit: radiusUnit },
        { header: 'outer radius', unit: radiusUnit },
        { header: 'mean |φ|²/n' },
        { header: 'max |φ|²/n' },
        { header: 'coherent sites' },
      ],
      rows: shellRows.length > 0 ? shellRows : [['no Mott shell', 0, 0, null, null, null, null, null]],
    },
  ];

  if (thermal && c.shellStatistics.length > 0) {
    blocks.push({
      kind: 'table',
      caption:
        `Thermal fluctuations of each shell at kT = ${(c.temperature / input.interaction).toPrecision(3)} U, against the atomic limit (J = 0) at the centre of the same plateau ` +
        `and the same kT. Fluctuation ratio = 4 kT dn/dmu (measured by ${c.fluctuationMeasure === 'compressibility' ? 'the local compressibility' : 'the number variance'}); ` +
        `1 is a normal fluid fluctuating equally between two fillings; a Mott site needs at most ${c.thresholds.compressibilityMin}.`,
      columns: [
        { header: 'shell' },
        { header: 'largest fluctuation ratio' },
        { header: 'mean variance' },
        { header: 'atomic-limit variance' },
        { header: 'mean P(odd)' },
        { header: 'atomic-limit P(odd)' },
      ],
      rows: c.shellStatistics.map((s) => [
        `n = ${s.filling}`,
        s.maxFluctuationRatio,
        s.meanNumberVariance,
        s.atomicReference.numberVariance,
        s.meanParityOdd,
        s.atomicReference.parityOdd,
      ]),
    });
  }

  const totalAtoms = phaseNames.reduce((sum, n) => sum + shells.byPhase[n].atoms, 0);
  blocks.push({
    kind: 'table',
    caption: 'Sites and atoms per phase',
    columns: [{ header: 'phase' }, { header: 'sites' }, { header: 'atoms' }, { header: 'fraction of atoms' }, { header: 'condensed atoms' }],
    rows: phaseNames
      .filter((n) => shells.byPhase[n].sites > 0)
      .map((n) => [phaseTitles[n], shells.byPhase[n].sites, shells.byPhase[n].atoms, totalAtoms >= 1e-6 ? shells.byPhase[n].atomFraction : null, shells.byPhase[n].condensedAtoms]),
  });

  blocks.push({ kind: 'paragraph', text: ruleText(c) });
  blocks.push({
    kind: 'table',
    caption: 'Thresholds used (scenario keys under "phases") and why each default is what it is',
    columns: [{ header: 'key' }, { header: 'value' }, { header: 'reason' }],
    rows: (Object.keys(thresholdReasons) as (keyof PhaseThresholds)[]).map((key) => [key, c.thresholds[key], thresholdReasons[key]]),
  });

  const lda = c.localDensity;
  if (lda !== undefined) {
    const cmp = lda.comparison;
    const total = cmp.agree + cmp.disagree;
    blocks.push({
      kind: 'paragraph',
      text:
        'Local-density view: beside each site label, the label of the homogeneous lattice (same mean field, same temperature, same rule) at the site\'s local chemical ' +
        `potential mu − eps_i and its own U and J. The two agree on ${cmp.agree} of ${total} sites; ` +
        (cmp.disagree === 0
          ? 'they never differ.'
          : `they differ on ${cmp.disagree}, where the neighbours (the trap's proximity effect, or the disorder) decide the phase rather than the local chemical potential. ` +
            `LDA Mott sites per filling: ${cmp.mottSitesByFilling.lda.slice(1).map((n, k) => `n = ${k + 1}: ${n}`).join(', ') || 'none'}; ` +
            `lattice: ${cmp.mottSitesByFilling.site.slice(1).map((n, k) => `n = ${k + 1}: ${n}`).join(', ') || 'none'}.`),
    });
    if (cmp.pairs.length > 0 || cmp.mottFillingDiffers > 0) {
      blocks.push({
        kind: 'table',
        caption: 'Where the lattice label and the local-density label differ',
        columns: [{ header: 'lattice label' }, { header: 'local-density label' }, { header: 'sites' }],
        rows: [
          ...cmp.pairs.map((p) => [phaseTitles[p.site], phaseTitles[p.lda], p.sites] as CellValue[]),
          ...(cmp.mottFillingDiffers > 0 ? [['Mott insulator', 'Mott insulator of another filling', cmp.mottFillingDiffers] as CellValue[]] : []),
        ],
      });
    }
  }
  blocks.push({ kind: 'paragraph', text: spanningText(c) });
  return blocks;
}

function ruleText(c: SiteClassification): string {
  const t = c.thresholds;
  const thermal = c.temperature > 0;
  const parts = [
    `How each site is labelled: empty where n < ${t.emptyDensityMax}; Mott insulator of filling k where the density is on a plateau, |n − k| ≤ ${t.integerTolerance}, ` +
      `and the site has no condensate of its own (condensate fraction |φ|²/n ≤ ${pct(t.condensateFractionMax)}, or |φ|² ≤ ${t.condensateMin})`,
    thermal
      ? `, and, at this temperature, its thermal fluctuations are suppressed: 4 kT dn/dmu ≤ ${t.compressibilityMin}, i.e. the site is at most ${t.compressibilityMin} times as ` +
        'compressible as a normal fluid that fluctuates equally between two fillings at the same kT (in the atomic limit the centre of a plateau crosses this at kT = 0.19 U, the melting of the Mott plateau near 0.2 U; Gerbier, PRL 99, 120405 (2007)). '
      : '. At T = 0 a Mott site of the mean field is a Fock state up to the admixture the neighbouring superfluid induces, so density and coherence decide; the compressibility is not used. ',
    `Superfluid where the condensate fraction exceeds ${pct(t.condensateFractionMax)}. Sites without condensate that are off-integer${thermal ? ' or too compressible' : ''} are labelled ${phaseTitles[c.compressibleWithoutCondensate]}`,
    c.compressibleWithoutCondensate === 'superfluid'
      ? ` (the clean lattice at T = 0 has no compressible insulator in mean field; ${c.superfluidBelowCondensateThreshold} such weakly coherent sites).`
      : c.compressibleWithoutCondensate === 'boseGlass'
        ? ' (with disorder at T = 0, the compressible insulator).'
        : ' (at T > 0 thermal excitations make a fluid compressible without disorder).',
  ];
  if (thermal && c.meltedPlateauSites > 0) {
    parts.push(` ${c.meltedPlateauSites} sites lie on a density plateau without condensate but fluctuate too much to count as Mott (a melting shell).`);
  }
  return parts.join('');
}

function spanningText(c: SiteClassification): string {
  const b = c.bulk;
  return (
    `Does the superfluid span the cloud? It is decided on the bulk of the cloud, not on its dilute rim: the ${b.sites} sites whose density is at least ` +
    `${(b.densityThreshold).toPrecision(3)} (a fraction ${c.thresholds.bulkDensityFraction} of the peak ${b.peakDensity.toPrecision(4)}), eroded by ${b.erosionSites} site` +
    `${b.erosionSites === 1 ? '' : 's'}, so that the thin superfluid skin at the edge of every trapped cloud cannot connect its sides. A superfluid cluster spans when it ` +
    'touches opposite faces of the bulk (or wraps around a periodic axis), or when it encloses the trap centre: a ring or shell of superfluid between two Mott shells is ' +
    `connected all around the cloud. Superfluid clusters in the bulk: ${c.clusters.count}, largest ${c.clusters.largestSize} sites; ${c.enclosingClusters} enclose the centre; ` +
    `${c.superfluidPuddleSites} superfluid sites are in puddles that do neither; ${c.rimSuperfluidSites} superfluid sites lie on the rim outside the bulk. ` +
    `Result: ${c.superfluidSpans ? 'the superfluid spans the cloud' : 'no superfluid cluster spans the cloud'}.`
  );
}

/** Status banners for the reading warnings (the not-converged one is the error banner already shown). */
export function warningStatusLines(warnings: readonly { code: string; message: string }[]): StatusLine[] {
  return warnings
    .filter((w) => w.code !== 'not-converged')
    .map((w) => ({ level: w.code === 'empty-cloud' ? ('error' as const) : ('warning' as const), text: `${w.code}: ${w.message}` }));
}
