// WebAssembly site kernel (AssemblyScript): the red-black half-sweeps and the measuring
// pass of src/solver/sweepKernel.ts over the solver state in a shared memory, for one
// thread's range of rows. Same algorithm and operation order as the JavaScript reference,
// so both give the same doubles; T = 0 sweeps solve two sites of one colour at once in
// f64x2 lanes (groundPair.ts). Built by `npm run build` (scripts/build-kernel.mjs).

import { groundEnergy, groundObservables, obsDensity, obsDensitySq, obsParityOdd, obsTopWeight, setGroundScratch, solveGroundScalar } from './groundScalar';
import {
  PAIR_NOT_APPLICABLE,
  PAIR_SOLVED,
  pairDensity,
  pairDensitySq,
  pairEnergyA,
  pairEnergyB,
  pairObservables,
  pairParityOdd,
  pairPhiA,
  pairPhiB,
  pairTopWeight,
  setPairScratch,
  solveGroundPair,
} from './groundPair';
import { QUAD_SOLVED, quadEnergy0, quadEnergy1, quadEnergy2, quadEnergy3, quadPhi0, quadPhi1, quadPhi2, quadPhi3, setQuadScratch, solveGroundQuad } from './groundQuad';
import {
  setThermalScratch,
  solveSiteThermal,
  thermalDensity,
  thermalDensitySq,
  thermalEnergy,
  thermalEntropy,
  thermalParityOdd,
  thermalTopWeight,
} from './thermalScalar';
import { setWarmScratch, thermalSweepUpdate } from './thermalWarm';
import {
  couplingsPtr,
  deltaPtr,
  densityPtr,
  densitySqPtr,
  entropyPtr,
  epsPtr,
  f64At,
  grandPotentialPtr,
  interactionAt,
  lowerPtr,
  measureMeanField,
  n0,
  n1,
  n2,
  nmax,
  parityOddPtr,
  periodic0,
  periodic1,
  phiPtr,
  psiPrevPtr,
  psiPtr,
  spectrumPtr,
  states,
  sweepMeanField,
  topWeightPtr,
} from './lattice';

export { setGeometry, setFields, setMeasureFields } from './lattice';
export { SLOT_BYTES } from './scratch';
export { fdExp, fdLog } from './fdlibm';
export { quadLaneFallbacks, quadSolved, quadSplitAdjugate, quadSplitTrailing } from './groundQuad';

/** This instance's scratch slot (bytes at slot .. slot + SLOT_BYTES); after setGeometry. */
export function setScratch(slot: i32): void {
  setGroundScratch(slot, states);
  setThermalScratch(slot, states);
  setPairScratch(slot, states);
  setQuadScratch(slot, states);
  setWarmScratch(slot, states);
}

/** 0: pairs of sites in f64x2 lanes; 1: one site at a time (both give the same doubles) */
let scalarOnly: bool = false;
export function setScalarOnly(flag: bool): void {
  scalarOnly = flag;
}
/** sweeps: four sites (two interleaved pairs, groundQuad.ts) at a time; false: pairs only */
let quads: bool = true;
export function setQuads(flag: bool): void {
  quads = flag;
}

let maxChange: f64 = 0.0;

@inline function commit(i: i32, phiNew: f64): void {
  const slot = phiPtr + (i << 3);
  const change = phiNew - load<f64>(slot);
  store<f64>(deltaPtr + (i << 3), change);
  store<f64>(slot, phiNew);
  const absChange = change < 0 ? -change : change;
  if (absChange > maxChange) maxChange = absChange;
}

/** Ground-state update of site i with mean field psi (the T = 0 body of sweepColour). */
function updateGround(i: i32, psi: f64, mu: f64, coupling: f64): void {
  const u = interactionAt(i);
  const prev = f64At(lowerPtr, i);
  const dPsi = psi - f64At(psiPrevPtr, i);
  const bound = prev == prev ? prev - Math.abs(dPsi) * coupling - 1e-12 * (Math.abs(prev) + u) : NaN;
  const estimate = prev == prev ? prev - 2.0 * f64At(phiPtr, i) * dPsi : NaN;
  const phiNew = solveGroundScalar(u, mu - f64At(epsPtr, i), psi, bound, estimate);
  store<f64>(lowerPtr + (i << 3), groundEnergy);
  store<f64>(psiPrevPtr + (i << 3), psi);
  commit(i, phiNew);
}

@inline function storeGround(i: i32, psi: f64, energy: f64, phiNew: f64): void {
  store<f64>(lowerPtr + (i << 3), energy);
  store<f64>(psiPrevPtr + (i << 3), psi);
  commit(i, phiNew);
}

/** Ground-state update of sites i and i + 2 (f64x2 lanes, else one at a time). */
function updateGroundPair(i: i32, psiA: f64, psiB: f64, mu: f64, coupling: f64): void {
  if (solveGroundPair(i, i + 2, psiA, psiB, mu, coupling, false) != PAIR_NOT_APPLICABLE) {
    storeGround(i, psiA, pairEnergyA, pairPhiA);
    storeGround(i + 2, psiB, pairEnergyB, pairPhiB);
  } else {
    updateGround(i, psiA, mu, coupling);
    updateGround(i + 2, psiB, mu, coupling);
  }
}

/**
 * Update one colour in rows [rowStart, rowEnd); thermal when temperature > 0. Returns
 * max |delta phi| (NaN changes are ignored, as in the reference).
 */
export function sweepColour(colour: i32, rowStart: i32, rowEnd: i32, mu: f64, temperature: f64): f64 {
  const s0 = n1 * n2;
  const coupling = 2.0 * Math.sqrt(<f64>nmax);
  const thermal = temperature > 0;
  maxChange = 0.0;
  for (let row = rowStart; row < rowEnd; row++) {
    const a = row / n1;
    const b = row - a * n1;
    const base = row * n2;
    const up0: i32 = a + 1 < n0 ? s0 : periodic0 && n0 > 1 ? -(n0 - 1) * s0 : 0;
    const dn0: i32 = a > 0 ? -s0 : periodic0 && n0 > 1 ? (n0 - 1) * s0 : 0;
    const wu0: f64 = a + 1 < n0 || (periodic0 && n0 > 1) ? 1.0 : 0.0;
    const wd0: f64 = a > 0 || (periodic0 && n0 > 1) ? 1.0 : 0.0;
    const up1: i32 = b + 1 < n1 ? n2 : periodic1 && n1 > 1 ? -(n1 - 1) * n2 : 0;
    const dn1: i32 = b > 0 ? -n2 : periodic1 && n1 > 1 ? (n1 - 1) * n2 : 0;
    const wu1: f64 = b + 1 < n1 || (periodic1 && n1 > 1) ? 1.0 : 0.0;
    const wd1: f64 = b > 0 || (periodic1 && n1 > 1) ? 1.0 : 0.0;
    let c = (a + b + colour) & 1;
    if (thermal) {
      for (; c < n2; c += 2) {
        const i = base + c;
        const psi = sweepMeanField(i, c, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1);
        const u = interactionAt(i);
        let phiNew: f64;
        if (spectrumPtr != 0 && couplingsPtr != 0) {
          const offset = (i * states) << 3;
          phiNew = thermalSweepUpdate(u, mu - f64At(epsPtr, i), psi, psi - f64At(psiPrevPtr, i), temperature, spectrumPtr + offset, couplingsPtr + offset);
          store<f64>(psiPrevPtr + (i << 3), psi);
        } else {
          phiNew = solveSiteThermal(u, mu - f64At(epsPtr, i), psi, temperature, false);
        }
        commit(i, phiNew);
      }
      continue;
    }
    if (!scalarOnly) {
      if (quads) {
        for (; c + 6 < n2; c += 8) {
          const i = base + c;
          const psi0 = sweepMeanField(i, c, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1);
          const psi1 = sweepMeanField(i + 2, c + 2, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1);
          const psi2 = sweepMeanField(i + 4, c + 4, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1);
          const psi3 = sweepMeanField(i + 6, c + 6, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1);
          if (solveGroundQuad(i, psi0, psi1, psi2, psi3, mu, coupling) == QUAD_SOLVED) {
            storeGround(i, psi0, quadEnergy0, quadPhi0);
            storeGround(i + 2, psi1, quadEnergy1, quadPhi1);
            storeGround(i + 4, psi2, quadEnergy2, quadPhi2);
            storeGround(i + 6, psi3, quadEnergy3, quadPhi3);
          } else {
            updateGroundPair(i, psi0, psi1, mu, coupling);
            updateGroundPair(i + 4, psi2, psi3, mu, coupling);
          }
        }
      }
      for (; c + 2 < n2; c += 4) {
        const i = base + c;
        updateGroundPair(i, sweepMeanField(i, c, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1), sweepMeanField(i + 2, c + 2, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1), mu, coupling);
      }
    }
    for (; c < n2; c += 2) {
      const i = base + c;
      updateGround(i, sweepMeanField(i, c, up0, dn0, wu0, wd0, up1, dn1, wu1, wd1), mu, coupling);
    }
  }
  return maxChange;
}

/** Ground-state observables of site i at mean field psi (cold start, scalar). */
function measureGround(i: i32, psi: f64, mu: f64): void {
  solveGroundScalar(interactionAt(i), mu - f64At(epsPtr, i), psi, NaN, NaN);
  groundObservables();
  const at = i << 3;
  store<f64>(densityPtr + at, obsDensity);
  store<f64>(densitySqPtr + at, obsDensitySq);
  store<f64>(parityOddPtr + at, obsParityOdd);
  store<f64>(topWeightPtr + at, obsTopWeight);
  store<f64>(entropyPtr + at, 0.0);
  store<f64>(psiPtr + at, psi);
  store<f64>(grandPotentialPtr + at, groundEnergy + psi * f64At(phiPtr, i));
}

@inline function storePairLane(i: i32, psi: f64, energy: f64, density: f64, densitySq: f64, parityOdd: f64, topWeight: f64): void {
  const at = i << 3;
  store<f64>(densityPtr + at, density);
  store<f64>(densitySqPtr + at, densitySq);
  store<f64>(parityOddPtr + at, parityOdd);
  store<f64>(topWeightPtr + at, topWeight);
  store<f64>(entropyPtr + at, 0.0);
  store<f64>(psiPtr + at, psi);
  store<f64>(grandPotentialPtr + at, energy + psi * f64At(phiPtr, i));
}

/**
 * The measuring pass (measureRows) over rows [rowStart, rowEnd). At T = 0 cold (as the
 * reference), neighbouring sites in pairs of f64x2 lanes.
 */
export function measureRows(rowStart: i32, rowEnd: i32, mu: f64, temperature: f64): void {
  const coupling = 2.0 * Math.sqrt(<f64>nmax);
  for (let row = rowStart; row < rowEnd; row++) {
    const a = row / n1;
    const b = row - a * n1;
    const base = row * n2;
    if (temperature > 0) {
      for (let c = 0; c < n2; c++) {
        const i = base + c;
        const psi = measureMeanField(i, a, b, c);
        solveSiteThermal(interactionAt(i), mu - f64At(epsPtr, i), psi, temperature, true);
        const at = i << 3;
        store<f64>(densityPtr + at, thermalDensity);
        store<f64>(densitySqPtr + at, thermalDensitySq);
        store<f64>(parityOddPtr + at, thermalParityOdd);
        store<f64>(topWeightPtr + at, thermalTopWeight);
        store<f64>(entropyPtr + at, thermalEntropy);
        store<f64>(psiPtr + at, psi);
        store<f64>(grandPotentialPtr + at, thermalEnergy + psi * f64At(phiPtr, i));
      }
      continue;
    }
    let c = 0;
    if (!scalarOnly) {
      for (; c + 1 < n2; c += 2) {
        const i = base + c;
        const psiA = measureMeanField(i, a, b, c);
        const psiB = measureMeanField(i + 1, a, b, c + 1);
        if (solveGroundPair(i, i + 1, psiA, psiB, mu, coupling, true) == PAIR_SOLVED) {
          pairObservables();
          storePairLane(i, psiA, pairEnergyA, f64x2.extract_lane(pairDensity, 0), f64x2.extract_lane(pairDensitySq, 0), f64x2.extract_lane(pairParityOdd, 0), f64x2.extract_lane(pairTopWeight, 0));
          storePairLane(i + 1, psiB, pairEnergyB, f64x2.extract_lane(pairDensity, 1), f64x2.extract_lane(pairDensitySq, 1), f64x2.extract_lane(pairParityOdd, 1), f64x2.extract_lane(pairTopWeight, 1));
        } else {
          measureGround(i, psiA, mu);
          measureGround(i + 1, psiB, mu);
        }
      }
    }
    for (; c < n2; c++) measureGround(base + c, measureMeanField(base + c, a, b, c), mu);
  }
}
