// Laboratory description -> Hubbard parameters in Hz (energy/h), via the Wannier functions
// of src/physics (hubbardFromLab): species, wavelength and depth per lattice axis, the
// confinement along axes the lattice does not resolve (a single 2D layer or 1D tubes), the
// trap frequencies and, optionally, the harmonic confinement added by the Gaussian envelope
// of red-detuned lattice beams.

import { InputError } from './inputError.js';
import { hubbardFromLab, type HubbardParameters } from '../physics/hubbardParameters.js';
import { ParameterError } from '../physics/parameterError.js';
import { nanokelvinToHz } from '../physics/energyUnits.js';
import { trapCurvatureHzPerSite2 } from '../physics/harmonicTrap.js';
import { envelopeTrapFrequencyHz, localDepthEr } from '../physics/beamEnvelope.js';
import { latticeAxisInterpolator } from '../physics/depthInterpolation.js';
import { minAxisDepthEr } from '../physics/latticeAxis.js';
import type { Scenario } from './scenarioSchema.js';

export interface LaboratoryParameters {
  /** J per lattice axis, Hz */
  hoppingHz: number[];
  interactionHz: number;
  latticeSpacingUm: number;
  /** energy/h of k_B x 1 nK */
  hertzPerNanokelvin: number;
  /** trap coefficient per lattice axis, Hz per site^2 */
  trapCoefficientHz: number[];
  /** trap frequency per lattice axis actually used (trap + beam envelope), Hz */
  trapFrequencyHz: number[];
  /** the part of it from the beam envelope, Hz (0 without waists) */
  envelopeFrequencyHz: number[];
  massKg: number;
  /** Wannier width along the first lattice axis, in lattice sites */
  wannierWidthSites: number;
  hubbard: HubbardParameters;
  warnings: string[];
  /** per-bond J (Hz) along each lattice axis when envelopeVariesHubbard is set, else null */
  hoppingArraysHz: Float64Array[] | null;
  /** per-site U (Hz) when envelopeVariesHubbard is set, else null */
  interactionArrayHz: Float64Array | null;
}

function perAxis(v: number | number[] | undefined, n: number, fallback: number): number[] {
  if (v === undefined) return Array(n).fill(fallback);
  if (typeof v === 'number') return Array(n).fill(v);
  return v.length === 1 ? Array(n).fill(v[0]) : [...v];
}

/** Physics errors (ParameterError) become input errors naming the scenario field. */
function asInputError(err: unknown, field: string): never {
  if (err instanceof ParameterError) throw new InputError(`${field}: ${err.message}`);
  throw err;
}

export function resolveLaboratory(scenario: Scenario): LaboratoryParameters {
  const lab = scenario.laboratory;
  if (!lab) throw new InputError('laboratory: missing');
  const dims = scenario.lattice.shape.length;
  const depths = perAxis(lab.depthEr, dims, NaN);
  const species =
    typeof lab.species === 'string'
      ? lab.species
      : lab.species.scatteringLengthBohr !== undefined
        ? { massU: lab.species.massU, scatteringLengthBohr: lab.species.scatteringLengthBohr }
        : { massU: lab.species.massU, scatteringLengthNm: lab.species.scatteringLengthNm as number };
  let hubbard: HubbardParameters;
  try {
    if (dims === 3) {
      hubbard = hubbardFromLab({ species, wavelengthNm: lab.wavelengthNm, depthEr: depths });
    } else if (lab.transverse?.depthEr !== undefined) {
      // The missing axes are deep lattices one site thick: their Wannier functions enter U
      // (their depth is in the recoil energy of their own wavelength).
      const transverseNm = lab.transverse.wavelengthNm ?? lab.wavelengthNm;
      hubbard = hubbardFromLab({
        species,
        wavelengthNm: [...Array(dims).fill(lab.wavelengthNm), ...Array(3 - dims).fill(transverseNm)],
        depthEr: [...depths, ...Array(3 - dims).fill(lab.transverse.depthEr)],
      });
    } else {
      hubbard = hubbardFromLab({
        species,
        wavelengthNm: lab.wavelengthNm,
        depthEr: depths,
        confinementFrequencyHz: Array(3 - dims).fill(lab.transverse?.trapFrequencyHz as number),
      });
    }
  } catch (err) {
    asInputError(err, 'laboratory');
  }
  const axes = hubbard.latticeAxes.slice(0, dims);
  const hoppingHz = axes.map((a) => a.tunnellingHz);
  const spacing = axes[0].latticeSpacingUm;
  const massKg = hubbard.species.massKg;

  const trapHz = perAxis(scenario.trap?.frequencyHz, dims, 0);
  let envelopeHz = Array(dims).fill(0);
  if (lab.beamWaistUm !== undefined) {
    const waists = perAxis(lab.beamWaistUm, dims, NaN);
    try {
      envelopeHz = Array.from(envelopeTrapFrequencyHz({ massKg, wavelengthNm: lab.wavelengthNm, depthEr: depths, waistUm: waists, axisCount: dims }));
    } catch (err) {
      asInputError(err, 'laboratory.beamWaistUm');
    }
  }
  // Harmonic potentials add: omega^2 = omega_trap^2 + omega_envelope^2 per axis.
  const totalHz = trapHz.map((f, d) => Math.sqrt(f * f + envelopeHz[d] * envelopeHz[d]));
  const trapCoefficientHz = Array.from(trapCurvatureHzPerSite2(massKg, totalHz, Array(dims).fill(spacing)));
  let hoppingArraysHz: Float64Array[] | null = null;
  let interactionArrayHz: Float64Array | null = null;
  if (lab.envelopeVariesHubbard && lab.beamWaistUm !== undefined) {
    const waists = perAxis(lab.beamWaistUm, dims, NaN);
    const centre = scenario.trap?.centreSites ?? scenario.lattice.shape.map((n) => (n - 1) / 2);
    try {
      ({ hoppingArraysHz, interactionArrayHz } = envelopeHubbardArrays(scenario.lattice.shape, centre, spacing, depths, waists, axes.map((a) => a.recoilHz), hubbard.interactionHz));
    } catch (err) {
      asInputError(err, 'laboratory.envelopeVariesHubbard');
    }
  }
  return {
    hoppingArraysHz,
    interactionArrayHz,
    hoppingHz,
    interactionHz: hubbard.interactionHz,
    latticeSpacingUm: spacing,
    hertzPerNanokelvin: nanokelvinToHz(1),
    trapCoefficientHz,
    trapFrequencyHz: totalHz,
    envelopeFrequencyHz: envelopeHz,
    massKg,
    wannierWidthSites: (axes[0].wannierWidthNm * 1e-3) / spacing,
    hubbard,
    warnings: hubbard.warnings,
  };
}

/**
 * J and U site by site under the Gaussian envelopes of the lattice beams: beam d (along
 * lattice axis d) has the local depth s_d exp(-2 r_perp^2 / w_d^2), r_perp the distance from
 * its axis (the other coordinates; beams centred on the trap centre, a layer at z = 0).
 * Both ends of a bond along d have the same r_perp, so J_d of a bond is J(s_d(r)) at either
 * end; U scales with prod_d int|w_d|^4 at the local depths (the factor from the axes
 * without lattice is unchanged). The site energy keeps the harmonic envelope term added to
 * the trap. J(s) and int|w|^4(s) come from Chebyshev interpolation of the exact 1D band
 * calculation (depthInterpolation.ts).
 */
function envelopeHubbardArrays(
  shape: readonly number[],
  centre: readonly number[],
  spacingUm: number,
  depthEr: readonly number[],
  waistUm: readonly number[],
  recoilHz: readonly number[],
  interactionCentreHz: number,
): { hoppingArraysHz: Float64Array[]; interactionArrayHz: Float64Array } {
  const dims = shape.length;
  const n = shape.reduce((a, b) => a * b, 1);
  const position = new Float64Array(3);
  const local = new Float64Array(dims);
  const depths = new Float64Array(n * dims);
  const minDepth = Array(dims).fill(Infinity);
  const coords = [0, 0, 0];
  for (let i = 0; i < n; i++) {
    let r = i;
    for (let d = dims - 1; d >= 0; d--) {
      coords[d] = r % shape[d];
      r = (r - coords[d]) / shape[d];
    }
    for (let d = 0; d < 3; d++) position[d] = d < dims ? (coords[d] - centre[d]) * spacingUm : 0;
    localDepthEr(depthEr, waistUm, position, local);
    for (let d = 0; d < dims; d++) {
      depths[i * dims + d] = local[d];
      if (local[d] < minDepth[d]) minDepth[d] = local[d];
    }
  }
  const hoppingArraysHz: Float64Array[] = [];
  const w4Ratio = new Float64Array(n).fill(1);
  for (let d = 0; d < dims; d++) {
    if (minDepth[d] < minAxisDepthEr) {
      throw new InputError(
        `laboratory.envelopeVariesHubbard: at the lattice edge the depth along axis ${d} falls to ${minDepth[d].toFixed(3)} E_r, ` +
          `below ${minAxisDepthEr} E_r where the single-band model fails; use wider beams or a smaller lattice`,
      );
    }
    const top = depthEr[d];
    const interp = latticeAxisInterpolator(Math.min(minDepth[d], top * (1 - 1e-9)), top);
    const w4Centre = interp.integralW4PerSite(top);
    const hop = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const s = depths[i * dims + d];
      hop[i] = interp.tunnellingEr(s) * recoilHz[d];
      w4Ratio[i] *= interp.integralW4PerSite(s) / w4Centre;
    }
    hoppingArraysHz.push(hop);
  }
  const interactionArrayHz = new Float64Array(n);
  for (let i = 0; i < n; i++) interactionArrayHz[i] = interactionCentreHz * w4Ratio[i];
  return { hoppingArraysHz, interactionArrayHz };
}
