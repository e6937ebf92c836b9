// The report of `tiercake compare` (src/report/compareReport.ts): the status lines say when
// the fit or the solve at the best values cannot be trusted and carry every warning with its
// code (a parameter at a bound on top of the page), and the tables carry the fit's numbers
// unchanged.

import { rmSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildCompareReport, compareStatus } from '../../src/report/compareReport.js';
import { renderReportHtml } from '../../src/report/renderReport.js';
import type { CompareFit } from '../../src/pipeline/compareFit.js';
import { smallCompareFit } from '../helpers/smallCompareFit.js';

let fit: CompareFit;
let dir = '';
beforeAll(async () => {
  ({ fit, dir } = await smallCompareFit());
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('compare report', () => {
  it('a converged fit is reported as such, with its best values and the scenario as given', () => {
    const doc = buildCompareReport(fit, { imagePath: '/data/small.npy', images: [], createdIso: '2026-01-01T00:00:00Z', toolVersion: '0.1.0' });
    // The helper's picture is noise-free, so its one warning is the chi-square far below 1 (compareFitGoodness.test.ts).
    expect(doc.status.map((s) => s.level)).toEqual(['ok', 'warning']);
    expect(doc.status[1].text).toMatch(/^chi-square-far-from-one: the reduced chi-square is .* too large by about/);
    expect(doc.subtitle).toBe('small.npy against scenario small');
    const table = doc.sections[0].blocks[0];
    expect(table.kind).toBe('table');
    if (table.kind === 'table') {
      expect(table.rows[0].slice(0, 3)).toEqual(['atom number N', fit.parameters[0].best, fit.parameters[0].uncertainty]);
    }
    expect(renderReportHtml(doc)).toContain('tiercake compare');
  });

  it('warns when the solve at the best values did not converge or a parameter ended on its bound', () => {
    const doubtful: CompareFit = {
      ...fit,
      best: { ...fit.best, converged: false },
      fit: { ...fit.fit, converged: false, message: 'maximum number of iterations reached' },
      parameters: fit.parameters.map((p, j) => ({ ...p, atBound: j === 0 })),
      warnings: [{ code: 'fit-at-bound', message: 'atoms ended on a bound of its range' }],
    };
    const status = compareStatus(doubtful);
    expect(status[0]).toEqual({ level: 'error', text: expect.stringContaining('did NOT converge') });
    expect(status[1]).toEqual({ level: 'warning', text: expect.stringContaining('raise --max-iterations') });
    expect(status[2]).toEqual({ level: 'warning', text: 'fit-at-bound: atoms ended on a bound of its range' });
  });
});
