// The text of `tiercake hubbard`: the table (formatHubbardTable) and, with a beam power, the
// depth estimate; and the laser-safety caution that goes with that estimate. The terminal
// shows the text (and the caution once per output folder), hubbard.txt keeps both.

import { laserSafetyCaution } from '../physics/dipolePotential.js';
import { formatHubbardTable } from '../pipeline/hubbardTable.js';
import type { HubbardResult } from '../pipeline/hubbardRequest.js';

export function hubbardSummaryText(result: HubbardResult, beam: { powerW?: number | undefined; waistUm?: number | undefined }): { text: string; caution: string } {
  let text = formatHubbardTable(result.rows);
  const power = result.power;
  if (power) {
    text +=
      `\nDepth estimate for ${beam.powerW} W in a ${beam.waistUm} µm waist: ${power.depthEr.toFixed(2)} E_r ` +
      `(${(power.depthHz / 1000).toFixed(2)} kHz), scattering rate ${power.scatteringRateAtMaximumPerS.toExponential(2)} /s.\n`;
  }
  return { text, caution: power ? `CAUTION: ${laserSafetyCaution}\n` : '' };
}
