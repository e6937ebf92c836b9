// Laboratory description -> Hubbard parameters in Hz (filled in with the physics module).
import type { Scenario } from './scenarioSchema.js';
import { InputError } from '../cli/inputError.js';

export interface LaboratoryParameters {
  hoppingHz: number[];
  interactionHz: number;
  latticeSpacingUm: number;
  hertzPerNanokelvin: number;
  trapCoefficientHz: number[];
}

export function resolveLaboratory(scenario: Scenario): LaboratoryParameters {
  void scenario;
  throw new InputError('laboratory: not available yet');
}
