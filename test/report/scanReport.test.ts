// The scan report's shell column says what it measures (src/report/scanReport.ts with
// src/observables/radialFrame.ts): radii in a trap, distances from the lattice centre without
// one, and on a periodic lattice without a trap (no centre) the sites a shell holds. Made-up
// rows (no solve): the cells are compared with the rows' own shells.
import { describe, expect, it } from 'vitest';
import { buildScanReport } from '../../src/report/scanReport.js';
import type { ScanOutcome } from '../../src/output/scanOutputs.js';
import { planScan } from '../../src/pipeline/scan/scanPlan.js';
import type { Scenario } from '../../src/scenario/scenarioSchema.js';
import type { ParagraphBlock, TableBlock } from '../../src/report/reportModel.js';
import { madeUpOutcome, madeUpRow } from '../helpers/scanRows.js';

const plan = planScan([{ path: 'hubbard.hopping', values: [0.01, 0.02], spacing: 'list' }], 2);
const rows = [madeUpRow(plan, 0), madeUpRow(plan, 1)];
const outcomeOf = (scenario: Partial<Scenario>): ScanOutcome => madeUpOutcome(plan, rows, { scenario: { name: 'layer', ...scenario } as unknown as Scenario });

function shellCells(o: ScanOutcome): { header: string; unit: string | undefined; cells: unknown[]; text: string } {
  const doc = buildScanReport(o, [], '2026-01-01T00:00:00Z', []);
  const table = doc.sections.flatMap((s) => s.blocks).find((b): b is TableBlock => b.kind === 'table' && b.columns.some((c) => c.header === 'n = 1 shell'))!;
  const k = table.columns.findIndex((c) => c.header === 'n = 1 shell');
  const text = doc.sections.flatMap((s) => s.blocks).filter((b): b is ParagraphBlock => b.kind === 'paragraph').map((b) => b.text).join(' ');
  return { header: table.columns[k].header, unit: table.columns[k].unit, cells: table.rows.map((r) => r[k]), text };
}

describe('scan report: shell column by radial frame', () => {
  it('trapped: radii from the rows, named trap-scaled', () => {
    const c = shellCells(outcomeOf({ lattice: { shape: [16, 16], boundary: 'open' }, trap: { coefficient: 0.01 } } as Partial<Scenario>));
    expect(c.unit).toBe('radius in sites');
    expect(c.cells).toEqual(['0 – 3', '0 – 3.1']); // made-up outer radii 3 + point/10
    expect(c.text).toMatch(/trap-scaled radii/);
  });
  it('periodic without a trap: the sites of the shell, no radius', () => {
    const c = shellCells(outcomeOf({ lattice: { shape: [16, 16], boundary: 'periodic' } } as Partial<Scenario>));
    expect(c.unit).toBe('sites in the shell');
    expect(c.cells).toEqual([40, 40]);
    expect(c.text).toMatch(/no centre/);
    expect(c.text).not.toMatch(/trap-scaled/);
  });
  it('open without a trap: distances from the lattice centre', () => {
    const c = shellCells(outcomeOf({ lattice: { shape: [16, 16] } } as Partial<Scenario>));
    expect(c.text).toMatch(/no trap: shell radii are distances in sites from the lattice centre/);
  });
});
