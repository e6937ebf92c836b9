// Site-by-site phase classification of a Gutzwiller solution (DESIGN.md section 1):
// empty / superfluid / Mott insulator / Bose glass / normal fluid, with stated, relative
// thresholds; Mott filling per site; per-class counts; the statistics of each Mott shell
// (its proximity-induced coherence and thermal fluctuations beside the atomic-limit
// expectation); the superfluid cluster analysis on the bulk of the cloud; and, when the
// local parameters are given, the local-density-approximation label of every site.
//
// Phases follow Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989): the Mott
// insulator is incompressible with integer filling; the Bose glass is a compressible
// insulator that exists only with disorder and at T = 0; the superfluid has a
// condensate. In site-decoupled mean-field theory the Bose glass appears as
// compressible sites without a condensate next to superfluid puddles that do not
// connect across the cloud (Buonsante et al., PRA 76, 011602 (2007)). At T > 0 the Mott
// shell is a density plateau with suppressed thermal fluctuations that melts near
// kT = 0.2 U (Gerbier, PRL 99, 120405 (2007)).
//
// The rule of one site is in phaseRule.ts, the thresholds and their reasons in
// phaseThresholds.ts. The fluctuation ratio r = 4 kT dn/dmu uses the lattice's local
// compressibility when it was computed; otherwise 4 (<n^2> - <n>^2), its atomic-limit
// equivalent (fluctuation-dissipation), and the result says which.
//
// Spanning: superfluid clusters are labelled among the bulk sites only (cloudBulk.ts). A
// cluster spans when it touches opposite faces of the bulk's bounding box or wraps a
// periodic axis (superfluidClusters.ts), or when it encloses the trap centre: the ring or
// shell of superfluid between two Mott shells, connected all around the cloud
// (clusterEnclosure.ts). Superfluid sites outside the bulk (the dilute rim) are counted
// apart; superfluid sites of the bulk in no spanning cluster are puddles.

import { PhaseCode, phaseNames, type PhaseName } from './phaseCodes.js';
import { labelSuperfluidClusters, type SuperfluidClusters } from './superfluidClusters.js';
import { defaultPhaseThresholds, mergeThresholds, type PhaseThresholds } from './phaseThresholds.js';
import { compressibleLabel, isCoherent, phaseOf, plateauFilling, type PhaseRule } from './phaseRule.js';
import { cloudBulk } from './cloudBulk.js';
import { clustersEnclosing } from './clusterEnclosure.js';
import { plateauCentre } from './atomicLimit.js';
import {
  compareWithLocalDensity,
  localDensityPhases,
  type LocalDensityComparison,
  type LocalDensityInput,
} from './localDensityPhase.js';

export { defaultPhaseThresholds, type PhaseThresholds };

export interface SiteClassificationInput {
  /** Lattice shape [nx], [nx, ny] or [nx, ny, nz]; C order. */
  shape: readonly number[];
  /** Periodic boundary per axis (for cluster connectivity and the bulk); default open. */
  periodic?: readonly boolean[];
  /** Mean occupation n_i. */
  density: Float64Array;
  /** Condensate density |phi_i|^2. */
  condensateDensity: Float64Array;
  /** Local compressibility dn_i/dmu, in 1/(energy unit of mu). */
  compressibility: Float64Array;
  /** False when the compressibility was not computed (zeros): T > 0 then uses the variance. */
  compressibilityComputed?: boolean;
  /** <n^2> - <n>^2 per site (shell statistics; the T > 0 fall-back of the fluctuation ratio). */
  numberVariance?: Float64Array;
  /** P(n odd) per site (shell statistics). */
  parityOdd?: Float64Array;
  /** Optional entropy per site (units of k_B); summed per phase when given. */
  entropy?: Float64Array;
  /** Energy (unit of mu) that makes dn/dmu dimensionless and sets the atomic reference; pass U. */
  energyScale: number;
  /** k_B T in the energy unit of mu; 0 for the ground state. */
  temperature: number;
  /** True when the site potential contains disorder (box or speckle). */
  disordered: boolean;
  thresholds?: Partial<PhaseThresholds>;
  /** Local parameters for the LDA label of every site (skipped when absent). */
  localDensity?: LocalDensityInput;
  /** Fock-space truncation (atomic-limit reference of the shells); default 8. */
  nmax?: number;
  /** Trap centre per axis in site coordinates (for clusters enclosing it); default the lattice centre. */
  centre?: readonly number[];
}

export type PhaseTotals = Record<PhaseName, number>;

/** What one Mott shell (all Mott sites of one filling) looks like inside. */
export interface ShellStatistics {
  filling: number;
  sites: number;
  atoms: number;
  /** proximity-induced coherence: mean and largest |phi|^2 / n over the shell's sites */
  meanCondensateFraction: number;
  maxCondensateFraction: number;
  /** shell sites with |phi|^2 above condensateMin (an absolute rule would have erased them) */
  coherentSites: number;
  /** mean <n^2> - <n>^2 and P(n odd) over the shell, when given (else null) */
  meanNumberVariance: number | null;
  meanParityOdd: number | null;
  /** T > 0: largest fluctuation ratio 4 kT dn/dmu in the shell (null at T = 0) */
  maxFluctuationRatio: number | null;
  /**
   * The atomic limit (J = 0) at the plateau centre, mu = U (k - 1/2), at the same kT: the
   * thermal expectation the shell is compared with.
   */
  atomicReference: { numberVariance: number; parityOdd: number; fluctuationRatio: number };
}

export interface BulkSummary {
  sites: number;
  /** density threshold of the bulk (fraction x peak density) */
  densityThreshold: number;
  peakDensity: number;
  erosionSites: number;
}

export interface LocalDensityLabels {
  /** PhaseCode of the homogeneous state at each site's local mu, U, J and T */
  codes: Uint8Array;
  mottFilling: Int32Array;
  comparison: LocalDensityComparison;
  evaluations: number;
}

export interface SiteClassification {
  /** PhaseCode per site. */
  codes: Uint8Array;
  /** Integer filling of Mott sites, 0 elsewhere. */
  mottFilling: Int32Array;
  /** Number of sites per phase. */
  counts: PhaseTotals;
  /** Mott sites per filling (index = filling; index 0 is always 0). */
  mottSitesByFilling: number[];
  /** Sum of the entropy per phase (k_B), when entropy was given. */
  entropyByPhase?: PhaseTotals;
  /** The thresholds actually used (defaults merged with the caller's). */
  thresholds: PhaseThresholds;
  /** k_B T used (energy unit of mu). */
  temperature: number;
  /** What measured the fluctuations at T > 0 ('none' at T = 0, where no fluctuation rule applies). */
  fluctuationMeasure: 'none' | 'compressibility' | 'numberVariance';
  /** Phase given to compressible sites without condensate (rule 4 in phaseRule.ts). */
  compressibleWithoutCondensate: 'normalFluid' | 'boseGlass' | 'superfluid';
  /** Clean T = 0 sites classified superfluid by rule 4 (condensate below threshold). */
  superfluidBelowCondensateThreshold: number;
  /** T > 0: plateau sites without condensate that are too compressible for a shell (melted). */
  meltedPlateauSites: number;
  /** Per Mott filling, inner statistics of the shell. */
  shellStatistics: ShellStatistics[];
  /** The bulk on which spanning was decided. */
  bulk: BulkSummary;
  /** Connected superfluid clusters within the bulk. */
  clusters: SuperfluidClusters;
  /** Clusters that enclose the trap centre (rings or shells between Mott shells). */
  enclosingClusters: number;
  /** Superfluid sites of the bulk that belong to clusters that neither span it nor enclose the centre. */
  superfluidPuddleSites: number;
  /** Superfluid sites outside the bulk (the dilute rim), not used for spanning. */
  rimSuperfluidSites: number;
  /** True when some superfluid cluster spans the bulk or encloses the trap centre. */
  superfluidSpans: boolean;
  /** LDA labels and where they differ, when the local parameters were given. */
  localDensity?: LocalDensityLabels;
}

function zeroTotals(): PhaseTotals {
  return { empty: 0, superfluid: 0, mott: 0, boseGlass: 0, normalFluid: 0 };
}

/** Classifies every site (rules in phaseRule.ts, thresholds in phaseThresholds.ts). */
export function classifySites(input: SiteClassificationInput): SiteClassification {
  const { shape, density, condensateDensity, compressibility, entropy, energyScale, temperature } = input;
  const siteCount = density.length;
  const expected = Array.isArray(shape) ? shape.reduce((p, n) => p * n, 1) : NaN;
  if (siteCount !== expected) {
    throw new RangeError(
      `classification density: expected ${expected} sites for shape ${JSON.stringify(shape)}, got ${siteCount}`,
    );
  }
  const arrays: [string, Float64Array | undefined][] = [
    ['condensateDensity', condensateDensity],
    ['compressibility', compressibility],
    ['numberVariance', input.numberVariance],
    ['parityOdd', input.parityOdd],
    ['entropy', entropy],
  ];
  for (const [name, array] of arrays) {
    if (array !== undefined && array.length !== siteCount) {
      throw new RangeError(`classification ${name}: expected ${siteCount} sites, got ${array.length}`);
    }
  }
  if (!Number.isFinite(energyScale) || energyScale <= 0) {
    throw new RangeError(
      `classification energyScale: expected the interaction energy U (> 0, unit of mu), got ${energyScale}`,
    );
  }
  if (!Number.isFinite(temperature) || temperature < 0) {
    throw new RangeError(`classification temperature: expected k_B T >= 0 (unit of mu), got ${temperature}`);
  }
  const thresholds = mergeThresholds(input.thresholds);
  const thermal = temperature > 0;
  const compressibleWithoutCondensate = compressibleLabel(thermal, input.disordered);
  const rule: PhaseRule = { thresholds, thermal, compressibleCode: PhaseCode[compressibleWithoutCondensate] };
  const useCompressibility = input.compressibilityComputed !== false;
  const variance = input.numberVariance;
  const fluctuationMeasure: SiteClassification['fluctuationMeasure'] = !thermal
    ? 'none'
    : useCompressibility
      ? 'compressibility'
      : variance !== undefined
        ? 'numberVariance'
        : 'none';

  const codes = new Uint8Array(siteCount);
  const mottFilling = new Int32Array(siteCount);
  const ratio = new Float64Array(thermal ? siteCount : 0);
  let superfluidBelowCondensateThreshold = 0;
  let meltedPlateauSites = 0;

  for (let i = 0; i < siteCount; i++) {
    const n = density[i];
    const condensate = condensateDensity[i];
    if (!Number.isFinite(n) || !Number.isFinite(condensate)) {
      throw new RangeError(`classification: density or condensateDensity is not finite at site ${i}`);
    }
    let r = NaN;
    if (thermal) {
      r =
        fluctuationMeasure === 'compressibility'
          ? 4 * temperature * compressibility[i]
          : fluctuationMeasure === 'numberVariance' && variance !== undefined
            ? 4 * variance[i]
            : NaN;
      ratio[i] = r;
    }
    const code = phaseOf(n, condensate, r, rule);
    codes[i] = code;
    if (code === PhaseCode.mott) {
      mottFilling[i] = plateauFilling(n, thresholds.integerTolerance);
    } else if (code !== PhaseCode.empty && !isCoherent(n, condensate, thresholds)) {
      if (code === PhaseCode.superfluid) superfluidBelowCondensateThreshold++;
      if (thermal && plateauFilling(n, thresholds.integerTolerance) > 0) meltedPlateauSites++;
    }
  }

  const counts = zeroTotals();
  const entropyByPhase = entropy !== undefined ? zeroTotals() : undefined;
  const mottSitesByFilling: number[] = [0];
  for (let i = 0; i < siteCount; i++) {
    const name = phaseNames[codes[i]];
    counts[name]++;
    if (entropyByPhase !== undefined && entropy !== undefined) entropyByPhase[name] += entropy[i];
    const filling = mottFilling[i];
    if (filling > 0) {
      while (mottSitesByFilling.length <= filling) mottSitesByFilling.push(0);
      mottSitesByFilling[filling]++;
    }
  }

  const shellStatistics = shellStatisticsOf(input, codes, mottFilling, ratio, thresholds, mottSitesByFilling);

  // Spanning on the bulk of the cloud.
  const bulk = cloudBulk(density, shape, input.periodic, thresholds.bulkDensityFraction, thresholds.bulkErosionSites);
  const superfluidInBulk = new Uint8Array(siteCount);
  let rimSuperfluidSites = 0;
  for (let i = 0; i < siteCount; i++) {
    if (codes[i] !== PhaseCode.superfluid) continue;
    if (bulk.mask[i] === 1) superfluidInBulk[i] = 1;
    else rimSuperfluidSites++;
  }
  const clusters = labelSuperfluidClusters(superfluidInBulk, { shape, periodic: input.periodic, occupied: bulk.mask });
  const enclosing = clustersEnclosing(clusters.labels, clusters.count, shape, centreSiteOf(shape, input.centre));
  let enclosingClusters = 0;
  let sitesInExtendedClusters = 0;
  for (let label = 0; label < clusters.count; label++) {
    if (enclosing[label] === 1) enclosingClusters++;
    if (enclosing[label] === 1 || clusters.spanningAxes[label] !== 0) sitesInExtendedClusters += clusters.sizes[label];
  }

  let localDensity: LocalDensityLabels | undefined;
  if (input.localDensity !== undefined) {
    const lda = localDensityPhases(input.localDensity, rule);
    localDensity = { ...lda, comparison: compareWithLocalDensity(codes, mottFilling, lda) };
  }

  return {
    codes,
    mottFilling,
    counts,
    mottSitesByFilling,
    ...(entropyByPhase !== undefined ? { entropyByPhase } : {}),
    thresholds,
    temperature,
    fluctuationMeasure,
    compressibleWithoutCondensate,
    superfluidBelowCondensateThreshold,
    meltedPlateauSites,
    shellStatistics,
    bulk: { sites: bulk.sites, densityThreshold: bulk.densityThreshold, peakDensity: bulk.peakDensity, erosionSites: thresholds.bulkErosionSites },
    clusters,
    enclosingClusters,
    superfluidPuddleSites: clusters.markedSites - sitesInExtendedClusters,
    rimSuperfluidSites,
    superfluidSpans: clusters.spans || enclosingClusters > 0,
    ...(localDensity !== undefined ? { localDensity } : {}),
  };
}

/** Flat index of the site nearest to the centre (default: the lattice centre). */
function centreSiteOf(shape: readonly number[], centre: readonly number[] | undefined): number {
  let index = 0;
  for (let d = 0; d < shape.length; d++) {
    const c = centre?.[d] ?? (shape[d] - 1) / 2;
    const site = Math.min(shape[d] - 1, Math.max(0, Math.round(c)));
    index = index * shape[d] + site;
  }
  return index;
}

function shellStatisticsOf(
  input: SiteClassificationInput,
  codes: Uint8Array,
  mottFilling: Int32Array,
  ratio: Float64Array,
  thresholds: PhaseThresholds,
  mottSitesByFilling: number[],
): ShellStatistics[] {
  const { density, condensateDensity, numberVariance, parityOdd, temperature, energyScale } = input;
  const thermal = temperature > 0;
  const out: ShellStatistics[] = [];
  for (let k = 1; k < mottSitesByFilling.length; k++) {
    if (mottSitesByFilling[k] === 0) continue;
    let sites = 0;
    let atoms = 0;
    let fractionSum = 0;
    let fractionMax = 0;
    let coherentSites = 0;
    let varianceSum = 0;
    let paritySum = 0;
    let ratioMax = 0;
    for (let i = 0; i < codes.length; i++) {
      if (codes[i] !== PhaseCode.mott || mottFilling[i] !== k) continue;
      sites++;
      atoms += density[i];
      const f = condensateDensity[i] / density[i];
      fractionSum += f;
      if (f > fractionMax) fractionMax = f;
      if (condensateDensity[i] > thresholds.condensateMin) coherentSites++;
      if (numberVariance !== undefined) varianceSum += numberVariance[i];
      if (parityOdd !== undefined) paritySum += parityOdd[i];
      if (thermal && ratio[i] > ratioMax) ratioMax = ratio[i];
    }
    const centre = plateauCentre(k, energyScale, temperature, input.nmax ?? 8);
    out.push({
      filling: k,
      sites,
      atoms,
      meanCondensateFraction: fractionSum / sites,
      maxCondensateFraction: fractionMax,
      coherentSites,
      meanNumberVariance: numberVariance !== undefined ? varianceSum / sites : null,
      meanParityOdd: parityOdd !== undefined ? paritySum / sites : null,
      maxFluctuationRatio: thermal ? ratioMax : null,
      atomicReference: {
        numberVariance: centre.numberVariance,
        parityOdd: centre.parityOdd,
        fluctuationRatio: 4 * centre.numberVariance,
      },
    });
  }
  return out;
}
