// Shell structure of a trapped cloud: for each Mott filling, how many sites and atoms the
// insulating shell holds and between which (trap-scaled) radii it lies; and how the atoms
// divide between superfluid, Mott, Bose-glass, normal-fluid and empty sites. This is the
// "wedding cake" read-out that in-situ imaging compares with (e.g. Gemelke et al.,
// Nature 460, 995 (2009); Sherson et al., Nature 467, 68 (2010)).

import { PhaseCode, phaseNames, type PhaseName } from './phaseCodes.js';

export interface MottShell {
  filling: number;
  sites: number;
  atoms: number;
  /** smallest and largest scaled radius of a site in the shell (sites) */
  innerRadius: number;
  outerRadius: number;
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
): ShellSummary {
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
        shell = { filling: f, sites: 0, atoms: 0, innerRadius: Infinity, outerRadius: 0 };
        shells.set(f, shell);
      }
      shell.sites++;
      shell.atoms += density[i];
      if (radius[i] < shell.innerRadius) shell.innerRadius = radius[i];
      if (radius[i] > shell.outerRadius) shell.outerRadius = radius[i];
    }
  }
  for (const name of phaseNames) byPhase[name].atomFraction = totalAtoms > 0 ? byPhase[name].atoms / totalAtoms : 0;
  return {
    shells: [...shells.values()].sort((a, b) => a.filling - b.filling),
    byPhase,
    condensateFraction: totalAtoms > 0 ? condensed / totalAtoms : 0,
  };
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
