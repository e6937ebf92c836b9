// Laboratory description -> Hubbard parameters in Hz (energy/h), via the Wannier functions
// of src/physics (hubbardFromLab): species, wavelength and depth per lattice axis, the
// confinement along axes the lattice does not resolve (a single 2D layer or 1D tubes), the
// trap frequencies and, optionally, the harmonic confinement added by the Gaussian envelope
// of red-detuned lattice beams.

import { InputError } from '../cli/inputError.js';
import { hubbardFromLab, type HubbardParameters } from '../physics/hubbardParameters.js';
import { ParameterError } from '../physics/parameterError.js';
import { nanokelvinToHz } from '../physics/energyUnits.js';
import { trapCurvatureHzPerSite2 } from '../physics/harmonicTrap.js';
import { envelopeTrapFrequencyHz } from '../physics/beamEnvelope.js';
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
      // The missing axes are deep lattices one site thick: their Wannier functions enter U.
      hubbard = hubbardFromLab({ species, wavelengthNm: lab.wavelengthNm, depthEr: [...depths, ...Array(3 - dims).fill(lab.transverse.depthEr)] });
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
  return {
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
