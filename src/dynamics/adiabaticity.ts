// Was a ramp slow enough? The state at the end of an evolution against the ground state at
// the final parameters with the same atom number (the Gutzwiller dynamics conserves N):
//
//   excess energy per atom  (E_final - E_ground) / N   (>= 0 up to solver tolerance: the
//                           ground state minimises the mean-field energy at fixed N)
//   site infidelity         1 - |<g_i|c_i(alpha)>|^2, mean and maximum over occupied sites
//                           (<n_i> of either state > 0.01), with c_{i,n}(alpha) =
//                           c_{i,n} e^{i n alpha}: the ground state is degenerate under the
//                           global U(1) rotation of the condensate phase, which the evolution
//                           turns freely (at the rate mu_final - mu_gauge), so alpha is the
//                           one that maximises the total fidelity; also independent of each
//                           site's overall phase
//   defects per shell       for every Mott filling k of the shell map: sum over the shell
//                           of 1 - P_i(k), in the final state, in the ground state (nonzero
//                           by quantum fluctuations), and the excess of the first over the
//                           second; holes sum_{n<k} P_i(n) likewise
//
// The verdict "adiabatic" means excess energy per atom <= threshold; the threshold is a
// choice (default 1% of the energy scale, normally U), not a law, and is reported.

import { goldenSectionMaximum } from '../numerics/goldenSection.js';
import type { DynamicsFrame } from './dynamicsFrame.js';
import { createObservableWorkspace, evolutionTotals, type EvolutionTotals } from './dynamicObservables.js';
import type { GutzwillerState } from './gutzwillerState.js';

export interface AdiabaticityRequest {
  final: GutzwillerState;
  /** Hamiltonian at the final parameters */
  frame: DynamicsFrame;
  /** ground state at the final parameters, same atom number */
  ground: GutzwillerState;
  /** Mott filling per site (0 = not in a shell), e.g. from the classification of the ground state */
  shellFilling: Int32Array | null;
  /** energy that sets the threshold, normally U */
  energyScale: number;
  /** largest excess energy per atom still called adiabatic; default 0.01 energyScale */
  excessEnergyThreshold?: number;
}

export interface ShellDefectCount {
  filling: number;
  sites: number;
  defects: number;
  groundDefects: number;
  excessDefects: number;
  /** excessDefects / sites */
  excessDefectsPerSite: number;
  holes: number;
  groundHoles: number;
}

export interface AdiabaticityVerdict {
  adiabatic: boolean;
  threshold: number;
  atoms: number;
  groundAtoms: number;
  energy: number;
  groundEnergy: number;
  excessEnergyPerAtom: number;
  /** excessEnergyPerAtom / energyScale */
  excessEnergyPerAtomInScale: number;
  meanInfidelity: number;
  maxInfidelity: number;
  /** the global rotation alpha (radians) of the condensate phase that best matches the ground state */
  condensatePhaseShift: number;
  shells: ShellDefectCount[];
  finalTotals: EvolutionTotals;
  groundTotals: EvolutionTotals;
  warnings: string[];
}

export function adiabaticityVerdict(request: AdiabaticityRequest): AdiabaticityVerdict {
  const { final, ground, frame, shellFilling } = request;
  if (final.siteCount !== ground.siteCount || final.nmax !== ground.nmax) {
    throw new RangeError('ground: expected the same lattice and nmax as the final state');
  }
  const ws = createObservableWorkspace(final.siteCount);
  const finalTotals = evolutionTotals(final, frame, ws, shellFilling);
  const groundTotals = evolutionTotals(ground, frame, ws, shellFilling);
  const threshold = request.excessEnergyThreshold ?? 0.01 * request.energyScale;
  const warnings: string[] = [];
  if (Math.abs(finalTotals.atoms - groundTotals.atoms) > 1e-6 * Math.max(1, finalTotals.atoms)) {
    warnings.push(
      `the reference ground state holds ${groundTotals.atoms.toPrecision(8)} atoms, the final state ${finalTotals.atoms.toPrecision(8)}: ` +
        'solve the final ground state at the final atom number',
    );
  }
  if (finalTotals.maxTopWeight > 1e-6) {
    warnings.push(`the final state has weight ${finalTotals.maxTopWeight.toExponential(2)} on |nmax>: raise nmax`);
  }
  const S = final.states;
  const a = final.amplitudes;
  const g = ground.amplitudes;
  const siteCount = final.siteCount;
  // overlaps per site and occupation: o_{i,n} = conj(g_{i,n}) c_{i,n}; the fidelity at alpha is
  // |sum_n o_{i,n} e^{i n alpha}|^2
  const overlapRe = new Float64Array(siteCount * S);
  const overlapIm = new Float64Array(siteCount * S);
  const occupied = new Uint8Array(siteCount);
  const byFilling = new Map<number, ShellDefectCount>();
  for (let i = 0; i < siteCount; i++) {
    const base = 2 * i * S;
    let nFinal = 0;
    let nGround = 0;
    const k = shellFilling === null ? 0 : shellFilling[i];
    let pk = 0;
    let gk = 0;
    let holes = 0;
    let groundHoles = 0;
    for (let n = 0; n < S; n++) {
      const ar = a[base + 2 * n];
      const ai = a[base + 2 * n + 1];
      const gr = g[base + 2 * n];
      const gi = g[base + 2 * n + 1];
      overlapRe[i * S + n] = gr * ar + gi * ai;
      overlapIm[i * S + n] = gr * ai - gi * ar;
      const p = ar * ar + ai * ai;
      const q = gr * gr + gi * gi;
      nFinal += n * p;
      nGround += n * q;
      if (n === k) {
        pk = p;
        gk = q;
      }
      if (n < k) {
        holes += p;
        groundHoles += q;
      }
    }
    occupied[i] = nFinal > 0.01 || nGround > 0.01 ? 1 : 0;
    if (k > 0) {
      let shell = byFilling.get(k);
      if (!shell) {
        shell = { filling: k, sites: 0, defects: 0, groundDefects: 0, excessDefects: 0, excessDefectsPerSite: 0, holes: 0, groundHoles: 0 };
        byFilling.set(k, shell);
      }
      shell.sites++;
      shell.defects += 1 - pk;
      shell.groundDefects += 1 - gk;
      shell.holes += holes;
      shell.groundHoles += groundHoles;
    }
  }
  // |<g_i| e^{i alpha n} |psi_i>|^2: the fidelity of site i once the global phase rotation
  // alpha (the one the ramp leaves undetermined) is taken out
  const siteFidelity = (i: number, alpha: number): number => {
    let re = 0;
    let im = 0;
    for (let n = 0; n < S; n++) {
      const c = Math.cos(n * alpha);
      const s = Math.sin(n * alpha);
      re += overlapRe[i * S + n] * c - overlapIm[i * S + n] * s;
      im += overlapRe[i * S + n] * s + overlapIm[i * S + n] * c;
    }
    return re * re + im * im;
  };
  const fidelitySum = (alpha: number): number => {
    let total = 0;
    for (let i = 0; i < siteCount; i++) {
      if (!occupied[i]) continue;
      total += siteFidelity(i, alpha);
    }
    return total;
  };
  // grid over [0, 2 pi), then golden-section refinement around the best grid point
  const grid = 64;
  let bestAlpha = 0;
  let bestValue = -Infinity;
  for (let m = 0; m < grid; m++) {
    const alpha = (2 * Math.PI * m) / grid;
    const v = fidelitySum(alpha);
    if (v > bestValue) {
      bestValue = v;
      bestAlpha = alpha;
    }
  }
  const alpha = goldenSectionMaximum(fidelitySum, bestAlpha - (2 * Math.PI) / grid, bestAlpha + (2 * Math.PI) / grid, { steps: 60 }).x;
  let infidelitySum = 0;
  let infidelityMax = 0;
  let occupiedCount = 0;
  for (let i = 0; i < siteCount; i++) {
    if (!occupied[i]) continue;
    const inf = Math.max(0, 1 - siteFidelity(i, alpha));
    infidelitySum += inf;
    if (inf > infidelityMax) infidelityMax = inf;
    occupiedCount++;
  }
  const shells = [...byFilling.values()].sort((x, y) => x.filling - y.filling);
  for (const s of shells) {
    s.excessDefects = s.defects - s.groundDefects;
    s.excessDefectsPerSite = s.excessDefects / s.sites;
  }
  const excess = (finalTotals.energy - groundTotals.energy) / finalTotals.atoms;
  return {
    adiabatic: excess <= threshold,
    threshold,
    atoms: finalTotals.atoms,
    groundAtoms: groundTotals.atoms,
    energy: finalTotals.energy,
    groundEnergy: groundTotals.energy,
    excessEnergyPerAtom: excess,
    excessEnergyPerAtomInScale: excess / request.energyScale,
    meanInfidelity: occupiedCount > 0 ? infidelitySum / occupiedCount : 0,
    condensatePhaseShift: alpha,
    maxInfidelity: infidelityMax,
    shells,
    finalTotals,
    groundTotals,
    warnings,
  };
}
