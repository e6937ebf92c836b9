// The local-density-approximation (LDA) label of every site: the phase of the homogeneous
// lattice (same Gutzwiller mean field, same temperature, same thresholds and rule,
// phaseRule.ts) at the site's local chemical potential mu - eps_i and its own U_i and
// hopping. Where the lattice label and the LDA label differ, the trap's proximity effects
// (or the disorder's) decide the phase, not the local chemical potential: superfluid
// tails reaching into a shell, a shell eroded by a neighbouring superfluid, Bose-glass
// puddles, or a temperature at which the homogeneous system would already have melted.
//
// The homogeneous state at (mu, zJ, U, T) is superfluid when zJ chi(mu, T) > 1, chi the
// linear response of the decoupled site (closed form, atomicSusceptibility in
// solver/homogeneous.ts); then phi comes from the homogeneous self-consistency
// (homogeneousPhi). Otherwise phi = 0 and the state is the atomic-limit site, whose
// fluctuation ratio is 4 kT dn/dmu = 4 (<n^2> - <n>^2) exactly. The local hopping is
// zJ_i = sum over axes of (J to the left + J to the right), i.e. 2 J_d per axis for uniform
// hopping (the bulk coordination; the open lattice face is not part of the homogeneous
// reference). Sites with equal (mu - eps, U, zJ) share one evaluation (a symmetric trap
// repeats each value 4 to 16 times).

import { PhaseCode, phaseNames, type PhaseName } from './phaseCodes.js';
import { plateauFilling, phaseOf, type PhaseRule } from './phaseRule.js';
import { atomicLimitSite, type AtomicSite } from './atomicLimit.js';
import { atomicSusceptibility, homogeneousPhi, solveHomogeneous } from '../solver/homogeneous.js';
import { createSiteObservables, createSiteWorkspace, solveSite } from '../solver/site/index.js';

export interface LocalDensityInput {
  /** chemical potential mu (energy unit of the model) */
  chemicalPotential: number;
  /** eps_i */
  sitePotential: Float64Array;
  interactionU: number | Float64Array;
  /** zJ_i, the summed hopping of the homogeneous reference (localCoordinationHopping) */
  coordinationHopping: number | Float64Array;
  /** kT, energy unit */
  temperature: number;
  nmax: number;
}

export interface LocalDensityPhases {
  /** PhaseCode of the homogeneous state at each site's local parameters */
  codes: Uint8Array;
  /** its Mott filling (0 elsewhere) */
  mottFilling: Int32Array;
  /** distinct (mu - eps, U, zJ) evaluated */
  evaluations: number;
}

/** zJ of the homogeneous reference per site: sum over axes of the two bonds' hopping. */
export function localCoordinationHopping(
  shape: readonly number[],
  periodic: readonly boolean[],
  hopping: ReadonlyArray<number | Float64Array>,
): number | Float64Array {
  const uniform = hopping.every((h) => typeof h === 'number');
  const active = shape.map((n) => n > 1);
  if (uniform) {
    let zJ = 0;
    hopping.forEach((h, d) => {
      if (active[d]) zJ += 2 * (h as number);
    });
    return zJ;
  }
  const count = shape.reduce((a, b) => a * b, 1);
  const out = new Float64Array(count);
  const strides = shape.map((_, d) => shape.slice(d + 1).reduce((a, b) => a * b, 1));
  for (let d = 0; d < shape.length; d++) {
    if (!active[d]) continue;
    const h = hopping[d];
    const len = shape[d];
    const stride = strides[d];
    for (let i = 0; i < count; i++) {
      const c = Math.floor(i / stride) % len;
      if (typeof h === 'number') {
        out[i] += 2 * h;
        continue;
      }
      // Bond i holds the link i -> i + e_d; the link from the left neighbour is at i - e_d.
      const right = c < len - 1 || periodic[d] ? h[i] : NaN;
      const leftIndex = c > 0 ? i - stride : periodic[d] ? i + (len - 1) * stride : -1;
      const left = leftIndex >= 0 ? h[leftIndex] : NaN;
      // At an open face only one bond exists: the homogeneous reference uses it twice.
      out[i] += Number.isNaN(right) ? 2 * left : Number.isNaN(left) ? 2 * right : left + right;
    }
  }
  return out;
}

const valueAt = (v: number | Float64Array, i: number): number => (typeof v === 'number' ? v : v[i]);

export function localDensityPhases(input: LocalDensityInput, rule: PhaseRule): LocalDensityPhases {
  const { chemicalPotential: mu, sitePotential: eps, interactionU, coordinationHopping, temperature, nmax } = input;
  const count = eps.length;
  for (const [name, v] of [['interactionU', interactionU], ['coordinationHopping', coordinationHopping]] as const) {
    if (typeof v !== 'number' && v.length !== count) throw new RangeError(`localDensityPhases ${name}: expected ${count} values, got ${v.length}`);
  }
  const thermal = temperature > 0;
  const ws = createSiteWorkspace(nmax);
  const obs = createSiteObservables();
  const scratch = createSiteObservables();
  const chiScratch = new Float64Array(nmax + 1);
  const atomic: AtomicSite = { density: 0, numberVariance: 0, parityOdd: 0, compressibility: 0 };
  const t = rule.thresholds;

  // Visit sites in order of (mu - eps, U, zJ) so that equal parameters are neighbours.
  const order = new Int32Array(count);
  for (let i = 0; i < count; i++) order[i] = i;
  order.sort((a, b) => eps[b] - eps[a] || valueAt(interactionU, a) - valueAt(interactionU, b) || valueAt(coordinationHopping, a) - valueAt(coordinationHopping, b) || a - b);

  const codes = new Uint8Array(count);
  const mottFilling = new Int32Array(count);
  let evaluations = 0;
  let lastEps = NaN;
  let lastU = NaN;
  let lastZ = NaN;
  let lastCode: number = PhaseCode.empty;
  let lastFilling = 0;
  for (let k = 0; k < count; k++) {
    const i = order[k];
    const u = valueAt(interactionU, i);
    const zJ = valueAt(coordinationHopping, i);
    if (eps[i] !== lastEps || u !== lastU || zJ !== lastZ) {
      evaluations++;
      const muLocal = mu - eps[i];
      const chi = atomicSusceptibility(u, muLocal, temperature, nmax, chiScratch).chi;
      let density: number;
      let condensate: number;
      let ratio = NaN;
      if (zJ > 0 && zJ * chi > 1) {
        const phi = homogeneousPhi(ws, { zJ, interactionU: u, mu: muLocal, temperature, nmax }, scratch);
        solveSite(ws, u, muLocal, zJ * phi, temperature, obs);
        density = obs.density;
        condensate = phi * phi;
        // The fluctuation ratio matters only for a plateau site without its own condensate.
        if (thermal && plateauFilling(density, t.integerTolerance) > 0 && !(condensate > t.condensateFractionMax * density && condensate > t.condensateMin)) {
          ratio = 4 * temperature * solveHomogeneous({ zJ, interactionU: u, mu: muLocal, temperature, nmax }).compressibility;
        }
      } else {
        atomicLimitSite(u, muLocal, temperature, nmax, atomic);
        density = atomic.density;
        condensate = 0;
        ratio = 4 * atomic.numberVariance;
      }
      lastCode = phaseOf(density, condensate, ratio, rule);
      lastFilling = lastCode === PhaseCode.mott ? plateauFilling(density, t.integerTolerance) : 0;
      lastEps = eps[i];
      lastU = u;
      lastZ = zJ;
    }
    codes[i] = lastCode;
    mottFilling[i] = lastFilling;
  }
  return { codes, mottFilling, evaluations };
}

export interface LabelDisagreement {
  site: PhaseName;
  lda: PhaseName;
  sites: number;
}

export interface LocalDensityComparison {
  /** sites whose lattice label (phase and Mott filling) equals the LDA label */
  agree: number;
  disagree: number;
  /** (site, lda) pairs of different phases, most sites first */
  pairs: LabelDisagreement[];
  /** Mott sites in both labellings but of different filling */
  mottFillingDiffers: number;
  /** Mott sites per filling in each labelling (index = filling) */
  mottSitesByFilling: { site: number[]; lda: number[] };
}

/** Counts where the lattice labels and the LDA labels differ (a different Mott filling counts). */
export function compareWithLocalDensity(
  siteCodes: Uint8Array,
  siteFilling: Int32Array,
  lda: LocalDensityPhases,
): LocalDensityComparison {
  const kinds = phaseNames.length;
  const table = new Float64Array(kinds * kinds);
  const siteByFilling: number[] = [0];
  const ldaByFilling: number[] = [0];
  let agree = 0;
  let differentFilling = 0;
  for (let i = 0; i < siteCodes.length; i++) {
    const a = siteCodes[i];
    const b = lda.codes[i];
    if (siteFilling[i] > 0) {
      while (siteByFilling.length <= siteFilling[i]) siteByFilling.push(0);
      siteByFilling[siteFilling[i]]++;
    }
    if (lda.mottFilling[i] > 0) {
      while (ldaByFilling.length <= lda.mottFilling[i]) ldaByFilling.push(0);
      ldaByFilling[lda.mottFilling[i]]++;
    }
    if (a === b && siteFilling[i] === lda.mottFilling[i]) agree++;
    else if (a === b) differentFilling++;
    table[a * kinds + b]++;
  }
  const pairs: LabelDisagreement[] = [];
  for (let a = 0; a < kinds; a++) {
    for (let b = 0; b < kinds; b++) {
      const n = table[a * kinds + b];
      if (a !== b && n > 0) pairs.push({ site: phaseNames[a], lda: phaseNames[b], sites: n });
    }
  }
  pairs.sort((p, q) => q.sites - p.sites);
  return {
    agree,
    disagree: siteCodes.length - agree,
    pairs,
    mottFillingDiffers: differentFilling,
    mottSitesByFilling: { site: siteByFilling, lda: ldaByFilling },
  };
}
