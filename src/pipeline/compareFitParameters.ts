// What the compare fit can fit, and how a fitted vector is reported.
//
// Requested names (the `--fit` list) and the parameter each one fits:
//   atoms        the chemical potential above the empty-lattice edge (compareFitModel.ts),
//                reported as the atom number N of the solution (the covariance carried by
//                dN/dp from finite-difference solves at the optimum);
//   mu           the same parameter, reported as the chemical potential (scenario energy unit);
//   temperature  k_B T in the scenario's energy unit, reported as `kT`;
//   entropy      the same parameter, reported as the entropy per atom S/(N k_B) of the
//                solution (covariance carried by dS/dp as for N);
//   trap         a common factor on the scenario's trap frequencies (`trapFrequencyFactor`);
//   angle        turn of the lattice against the camera, degrees counter-clockwise (`angleDeg`);
//   psf          Gaussian PSF sigma in the pictures' length unit (`psfSigma`);
//   offset       a flat background in atoms per pixel (`offset`); when it is fitted, the
//                median of the border pixels is not subtracted first but starts it.
// The trap centre (x, y) is always fitted unless it is fixed; it is reported in pixels of the
// frame as given (x = column, y = row from the top), `centreXPixels` and `centreYPixels`.
// Least squares is invariant under these changes of parameter (the same minimum); each
// reported row is a function of the fitted vector, and the covariance is carried by its
// Jacobian A (reported = r(p), C_reported = A C A^T).

import { InputError } from '../scenario/inputError.js';

export const FIT_PARAMETER_NAMES = ['atoms', 'mu', 'temperature', 'entropy', 'trap', 'angle', 'psf', 'offset'] as const;
export type FitParameterName = (typeof FIT_PARAMETER_NAMES)[number];

/** A parameter to fit with optional bounds in its reported unit (atoms, energy unit, degrees, length unit, atoms per pixel, factor). */
export interface FitParameterRequest {
  name: FitParameterName;
  lower?: number;
  upper?: number;
}

export type ReportedName = 'atoms' | 'mu' | 'kT' | 'entropyPerAtom' | 'trapFrequencyFactor' | 'centreXPixels' | 'centreYPixels' | 'angleDeg' | 'psfSigma' | 'offset';

/** The fitted parameters, in the order of the fit vector: physics first (each change is a solve), then the picture. */
export type SlotKey = 'muAbove' | 'kT' | 'trapFactor' | 'centreX' | 'centreY' | 'angle' | 'psf' | 'offset';

export interface FitSlot {
  key: SlotKey;
  physics: boolean;
  reported: ReportedName;
  start: number;
  lower: number;
  upper: number;
}

export interface FitSelection {
  atoms: boolean;
  mu: boolean;
  temperature: boolean;
  entropy: boolean;
  trap: boolean;
  angle: boolean;
  psf: boolean;
  offset: boolean;
  bounds: Partial<Record<FitParameterName, { lower?: number; upper?: number }>>;
}

/** Check a list of requests: known names, no name twice, atoms or mu, temperature or entropy, bounds in order. */
export function selectFitParameters(list: readonly (FitParameterName | FitParameterRequest)[]): FitSelection {
  const selection: FitSelection = { atoms: false, mu: false, temperature: false, entropy: false, trap: false, angle: false, psf: false, offset: false, bounds: {} };
  if (list.length === 0) throw new InputError('--fit: name at least one parameter, e.g. atoms or atoms,temperature');
  for (const item of list) {
    const request: FitParameterRequest = typeof item === 'string' ? { name: item } : item;
    if (!(FIT_PARAMETER_NAMES as readonly string[]).includes(request.name)) {
      throw new InputError(`--fit: "${request.name}" cannot be fitted; use ${FIT_PARAMETER_NAMES.join(', ')}`);
    }
    if (selection[request.name]) throw new InputError(`--fit: "${request.name}" is named twice; name each parameter once`);
    selection[request.name] = true;
    const { lower, upper } = request;
    if (lower !== undefined && upper !== undefined && !(lower < upper)) {
      throw new InputError(`--fit: the bounds of ${request.name} must be lower:upper with lower < upper, got ${lower}:${upper}`);
    }
    // A bound must be a number (an infinite one is the same as none); a one-sided NaN would pass
    // every comparison of the fit and silently remove the bound.
    for (const [side, value] of [['lower', lower], ['upper', upper]] as const) {
      if (value !== undefined && Number.isNaN(value)) throw new InputError(`--fit: the ${side} bound of ${request.name} is not a number; give a number or leave it out (${request.name}=lower:upper)`);
    }
    if (lower !== undefined || upper !== undefined) {
      if (request.name === 'entropy') {
        throw new InputError('--fit: entropy is fitted through the temperature and takes no bounds of its own; bound the temperature instead (temperature=lower:upper)');
      }
      selection.bounds[request.name] = { ...(lower !== undefined ? { lower } : {}), ...(upper !== undefined ? { upper } : {}) };
    }
  }
  if (selection.atoms && selection.mu) throw new InputError('--fit: atoms and mu are the same parameter (N follows from mu); name one of them');
  if (selection.temperature && selection.entropy) throw new InputError('--fit: temperature and entropy are the same parameter (S/N follows from T); name one of them');
  return selection;
}

/** Units of the reported rows. */
export function reportedUnit(name: ReportedName, energyUnit: string, lengthUnit: string): string {
  switch (name) {
    case 'atoms': return 'atoms';
    case 'mu':
    case 'kT': return energyUnit;
    case 'entropyPerAtom': return 'k_B per atom';
    case 'trapFrequencyFactor': return 'factor on the scenario trap frequencies';
    case 'centreXPixels':
    case 'centreYPixels': return 'pixels of the given frame';
    case 'angleDeg': return 'degrees';
    case 'psfSigma': return lengthUnit;
    case 'offset': return 'atoms per pixel';
  }
}

/** One reported quantity. */
export interface FitParameterRow {
  name: ReportedName;
  unit: string;
  start: number;
  best: number;
  /** uncertaintyFromSigma x max(1, sqrt(reduced chi-square)) (PDG scale-factor convention) */
  uncertainty: number;
  uncertaintyFromSigma: number;
  uncertaintyScaledByReducedChiSquare: number;
  /** standard deviation over bootstrap resamples of the shots (null for one shot) */
  bootstrapUncertainty: number | null;
  /** bounds of the fitted parameter in this row's unit (the centre rows: null) */
  lower: number | null;
  upper: number | null;
  atBound: boolean;
}
