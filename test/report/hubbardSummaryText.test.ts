// The text of `hubbard` (src/report/hubbardSummaryText.ts): the table as formatHubbardTable
// writes it, the depth estimate line with the numbers the estimate returned (depth to two
// decimals in E_r, depth/h in kHz = Hz / 1000), and the laser caution only with an estimate.
import { describe, expect, it } from 'vitest';
import { hubbardSummaryText } from '../../src/report/hubbardSummaryText.js';
import { runHubbardRequest } from '../../src/pipeline/hubbardRequest.js';
import { formatHubbardTable } from '../../src/pipeline/hubbardTable.js';
import { laserSafetyCaution } from '../../src/physics/dipolePotential.js';

describe('hubbardSummaryText', () => {
  const request = { species: '87Rb', wavelengthNm: 1064, depthsEr: [8, 12], axes: 3 as const };
  it('the table alone, and no caution, without a beam', () => {
    const r = runHubbardRequest(request);
    expect(hubbardSummaryText(r, {})).toEqual({ text: formatHubbardTable(r.rows), caution: '' });
  });
  it('with a beam: the estimate line and the caution', () => {
    const beam = { powerW: 0.8, waistUm: 120 };
    const r = runHubbardRequest({ ...request, ...beam });
    const p = r.power!;
    const { text, caution } = hubbardSummaryText(r, beam);
    expect(text.startsWith(formatHubbardTable(r.rows))).toBe(true);
    expect(text.endsWith(`\nDepth estimate for 0.8 W in a 120 µm waist: ${p.depthEr.toFixed(2)} E_r (${(p.depthHz / 1000).toFixed(2)} kHz), scattering rate ${p.scatteringRateAtMaximumPerS.toExponential(2)} /s.\n`)).toBe(true);
    expect(caution).toBe(`CAUTION: ${laserSafetyCaution}\n`);
  });
});
