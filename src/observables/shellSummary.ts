// Shell structure of a trapped cloud: for each Mott filling, how many sites and atoms the
// insulating shell holds and between which (trap-scaled) radii it lies; and how the atoms
// divide between superfluid, Mott, Bose-glass, normal-fluid and empty sites. This is the
// "wedding cake" read-out that in-situ imaging compares with (e.g. Gemelke et al.,
// Nature 460, 995 (2009); Sherson et al., Nature 467, 68 (2010)).
//
// Shell radii come from the same masks as the labels, read the way a radial profile is
// read: in annular bins of the trap-scaled radius (width binWidth sites, the profile's
// default 1), the fraction of a bin's sites that belong to the shell; the shell's edges
// are where that fraction crosses 1/2 (linear interpolation between the bins' mean radii).
// A shell that already holds at least half of the innermost bin is central: its inner
// radius is 0 (not the distance of the nearest site, 1/sqrt 2 on an even lattice). When no
// bin is half filled (a shell scattered by disorder) the radii fall back to the smallest
// and largest site radius, and `radiusFrom` says so.

import { PhaseCode, phaseNames, type PhaseName } from './phaseCodes.js';

export interface MottShell {
  filling: number;
  sites: number;
  atoms: number;
  /** inner and outer edge, trap-scaled radius in sites (see the file header) */
  innerRadius: number;
  outerRadius: number;
  /** 'annulus': half-occupation crossings of the radial bins; 'sites': extreme site radii */
  radiusFrom: 'annulus' | 'sites';
  /** smallest and largest scaled radius of a site in the shell (sites) */
  minSiteRadius: number;
  maxSiteRadius: number;
}

export interface PhaseShare {
  sites: number;
  atoms: number;
  condensedAtoms: number;
  /** atoms in this phase / all atoms */
  atomFraction: number;
}

export interface ShellSummary {
  shells: MottShell[];
  byPhase: Record<PhaseName, PhaseShare>;
  /** condensed atoms / all atoms */
  condensateFraction: number;
}

/**
 * `radius[i]` is the trap-scaled distance of site i from the trap centre (in sites);
 * `codes` and `mottFilling` come from the site classification.
 */
export function shellSummary(
  density: Float64Array,
  condensateDensity: Float64Array,
  codes: Uint8Array,
  mottFilling: Int32Array,
  radius: Float64Array,
  binWidth = 1,
): ShellSummary {
  if (!(binWidth > 0) || !Number.isFinite(binWidth)) throw new RangeError(`shellSummary binWidth: expected a positive number of sites, got ${binWidth}`);
  const shells = new Map<number, MottShell>();
  const byPhase = Object.fromEntries(
    phaseNames.map((name) => [name, { sites: 0, atoms: 0, condensedAtoms: 0, atomFraction: 0 }]),
  ) as Record<PhaseName, PhaseShare>;
  let totalAtoms = 0;
  let condensed = 0;
  for (let i = 0; i < density.length; i++) {
    const share = byPhase[phaseNames[codes[i]]];
    share.sites++;
    share.atoms += density[i];
    share.condensedAtoms += condensateDensity[i];
    totalAtoms += density[i];
    condensed += condensateDensity[i];
    if (codes[i] === PhaseCode.mott) {
      const f = mottFilling[i];
      let shell = shells.get(f);
      if (!shell) {
        shell = { filling: f, sites: 0, atoms: 0, innerRadius: 0, outerRadius: 0, radiusFrom: 'sites', minSiteRadius: Infinity, maxSiteRadius: 0 };
        shells.set(f, shell);
      }
      shell.sites++;
      shell.atoms += density[i];
      if (radius[i] < shell.minSiteRadius) shell.minSiteRadius = radius[i];
      if (radius[i] > shell.maxSiteRadius) shell.maxSiteRadius = radius[i];
    }
  }
  for (const shell of shells.values()) shellEdges(shell, codes, mottFilling, radius, binWidth);
  for (const name of phaseNames) byPhase[name].atomFraction = totalAtoms > 0 ? byPhase[name].atoms / totalAtoms : 0;
  return {
    shells: [...shells.values()].sort((a, b) => a.filling - b.filling),
    byPhase,
    condensateFraction: totalAtoms > 0 ? condensed / totalAtoms : 0,
  };
}

/** Sets innerRadius/outerRadius of a shell from the half-occupation crossings of its bins. */
function shellEdges(shell: MottShell, codes: Uint8Array, mottFilling: Int32Array, radius: Float64Array, binWidth: number): void {
  let rMax = 0;
  for (let i = 0; i < radius.length; i++) if (radius[i] > rMax) rMax = radius[i];
  const bins = Math.floor(rMax / binWidth) + 1;
  const all = new Float64Array(bins);
  const inShell = new Float64Array(bins);
  const radiusSum = new Float64Array(bins);
  for (let i = 0; i < radius.length; i++) {
    const b = Math.floor(radius[i] / binWidth);
    all[b]++;
    radiusSum[b] += radius[i];
    if (codes[i] === PhaseCode.mott && mottFilling[i] === shell.filling) inShell[b]++;
  }
  // Non-empty bins only, in order: mean radius and shell fraction.
  const r: number[] = [];
  const f: number[] = [];
  for (let b = 0; b < bins; b++) {
    if (all[b] === 0) continue;
    r.push(radiusSum[b] / all[b]);
    f.push(inShell[b] / all[b]);
  }
  let first = -1;
  let last = -1;
  for (let k = 0; k < f.length; k++) {
    if (f[k] >= 0.5) {
      if (first < 0) first = k;
      last = k;
    }
  }
  if (first < 0) {
    shell.innerRadius = shell.minSiteRadius;
    shell.outerRadius = shell.maxSiteRadius;
    shell.radiusFrom = 'sites';
    return;
  }
  const crossing = (a: number, b: number): number => r[a] + ((f[a] - 0.5) / (f[a] - f[b])) * (r[b] - r[a]);
  shell.innerRadius = first === 0 ? 0 : crossing(first, first - 1);
  shell.outerRadius = last === f.length - 1 ? r[last] + binWidth / 2 : crossing(last, last + 1);
  shell.radiusFrom = 'annulus';
}

/** Trap-scaled radius of every site: sqrt(sum_d s_d^2 (x_d - c_d)^2). */
export function scaledRadii(shape: readonly number[], centre: readonly number[], axisScale: readonly number[]): Float64Array {
  const dims = shape.length;
  const n = [shape[0], shape[1] ?? 1, shape[2] ?? 1];
  const c = [centre[0] ?? 0, centre[1] ?? 0, centre[2] ?? 0];
  const s = [axisScale[0] ?? 1, dims > 1 ? (axisScale[1] ?? 1) : 0, dims > 2 ? (axisScale[2] ?? 1) : 0];
  const out = new Float64Array(n[0] * n[1] * n[2]);
  let i = 0;
  for (let x = 0; x < n[0]; x++) {
    const dx = s[0] * (x - c[0]);
    for (let y = 0; y < n[1]; y++) {
      const dy = s[1] * (y - c[1]);
      for (let z = 0; z < n[2]; z++) {
        const dz = s[2] * (z - c[2]);
        out[i++] = Math.sqrt(dx * dx + dy * dy + dz * dz);
      }
    }
  }
  return out;
}
