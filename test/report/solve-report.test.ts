// The solve report says how the labels were made and when a reading cannot be trusted:
// warnings as banners above everything else, the classification rules with the thresholds
// and their reasons, per-shell proximity coherence, the local-density disagreement, the
// spanning rule, and null (not nonsense) fractions for an empty cloud. Solved for real on
// small lattices; the report's numbers are compared with the classification they come from.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { buildSolveReport } from '../../src/report/solveReport.js';
import { renderReportHtml } from '../../src/report/renderReport.js';
import { readingWarningsOfSolve } from '../../src/observables/readingWarnings.js';
import type { ReportDocument, TableBlock, ParagraphBlock } from '../../src/report/reportModel.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-solve-report-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function scenario(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 5 }, ...body }));
  return path;
}

async function report(path: string) {
  const a = await solveScenario(prepareScenario(path, []), { threads: 1 });
  const warnings = readingWarningsOfSolve(
    a.outcome,
    a.fields.density,
    { tolerance: a.scenario.solver.tolerance, topWeightMax: a.scenario.truncation.topWeightMax, fixedAtoms: a.resolved.chemical.kind === 'atoms' },
    { coefficient: a.resolved.trapCoefficient, centre: a.resolved.trapCentre },
  );
  const doc = buildSolveReport(a, [], '2025-01-01T00:00:00Z', {}, warnings);
  return { a, warnings, doc, html: renderReportHtml(doc) };
}

function section(doc: ReportDocument, heading: string) {
  const s = doc.sections.find((x) => x.heading === heading);
  expect(s, heading).toBeDefined();
  return s!;
}

describe('solve report: shells and phases', async () => {
  // A warm layer (kT = 0.1 U) and, below, a clipped cold one.
  const warm = await report(
    scenario('warm-layer', { lattice: { shape: [52, 52] }, hubbard: { hopping: 0.01 }, trap: { coefficient: 0.004 }, particles: { chemicalPotential: 1.6 }, temperature: { kT: 0.1 } }),
  );

  it('lists each shell with radii, proximity coherence and the thermal atomic-limit reference', () => {
    const blocks = section(warm.doc, 'Shells and phases').blocks;
    const shellTable = blocks[0] as TableBlock;
    const c = warm.a.classification;
    expect(shellTable.rows.length).toBe(warm.a.shells.shells.length);
    expect(shellTable.rows.length).toBeGreaterThanOrEqual(2);
    const central = shellTable.rows.find((r) => r[0] === 'n = 2')!;
    expect(central[3]).toBe(0); // the central shell starts at 0
    const thermal = blocks[1] as TableBlock;
    expect(thermal.caption).toMatch(/atomic limit/);
    const one = c.shellStatistics.find((s) => s.filling === 1)!;
    expect(thermal.rows.find((r) => r[0] === 'n = 1')).toEqual(['n = 1', one.maxFluctuationRatio, one.meanNumberVariance, one.atomicReference.numberVariance, one.meanParityOdd, one.atomicReference.parityOdd]);
  });

  it('explains the rule with the thresholds used and their reasons, the LDA comparison and the spanning rule', () => {
    const blocks = section(warm.doc, 'Shells and phases').blocks;
    const text = blocks.filter((b): b is ParagraphBlock => b.kind === 'paragraph').map((b) => b.text).join('\n');
    expect(text).toMatch(/\|n − k\| ≤ 0\.05/);
    expect(text).toMatch(/4 kT dn\/dmu ≤ 0\.5/);
    expect(text).toContain('Gerbier, PRL 99, 120405 (2007)');
    const lda = warm.a.classification.localDensity!.comparison;
    expect(text).toContain(`agree on ${lda.agree} of ${lda.agree + lda.disagree} sites`);
    expect(text).toMatch(/decided on the bulk of the cloud, not on its dilute rim/);
    expect(text).toContain(`the ${warm.a.classification.bulk.sites} sites`);
    const thresholds = blocks.find((b): b is TableBlock => b.kind === 'table' && (b.caption ?? '').startsWith('Thresholds used'))!;
    expect(thresholds.rows.map((r) => r[0])).toEqual(expect.arrayContaining(['condensateFractionMax', 'integerTolerance', 'compressibilityMin', 'bulkDensityFraction']));
    for (const row of thresholds.rows) expect(String(row[2]).length).toBeGreaterThan(40);
    expect(warm.warnings).toEqual([]);
  });
});

describe('solve report: warnings on top, empty cloud', () => {
  it('a clipped cloud shows its cloud-at-edge warning as a banner before any section', async () => {
    const clipped = await report(
      scenario('clipped-layer', { lattice: { shape: [16, 16] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.004 }, particles: { chemicalPotential: 1.2 } }),
    );
    expect(clipped.warnings.map((w) => w.code)).toEqual(['cloud-at-edge']);
    const banner = clipped.doc.status.find((s) => s.text.includes('cloud-at-edge'))!;
    expect(banner.level).toBe('warning');
    const at = clipped.html.indexOf('cloud-at-edge');
    expect(at).toBeGreaterThan(0);
    expect(at).toBeLessThan(clipped.html.indexOf('<section'));
  });

  it('mu = -5 U: condensate fraction and entropy per atom are null, and the empty-cloud banner is an error', async () => {
    const empty = await report(
      scenario('empty-layer', { lattice: { shape: [8, 8] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, particles: { chemicalPotential: -5 } }),
    );
    const totals = section(empty.doc, 'Parameters').blocks.find((b) => b.kind === 'keyValueTable' && b.caption === 'Totals');
    expect(totals?.kind).toBe('keyValueTable');
    if (totals?.kind !== 'keyValueTable') return;
    expect(totals.rows.find((r) => r.label === 'condensate fraction')!.value).toBeNull();
    expect(totals.rows.find((r) => r.label === 'entropy per atom')!.value).toBeNull();
    expect(empty.doc.status.find((s) => s.text.includes('empty-cloud'))!.level).toBe('error');
  });
});

// What a radius means depends on the lattice (src/observables/radialFrame.ts). Mott lobe at
// mu = U/2 with J = 0.01 U (zJ/U = 0.04 < zJ_c/U = 0.172 for n = 1 in 2D, van Oosten, van der
// Straten & Stoof, PRA 63, 053601 (2001)): without a trap the whole lattice is one n = 1 shell.
describe('solve report: radii only where a centre exists', () => {
  it('a trapped cloud reads the trap-scaled radius; an open untrapped box reads the distance from the lattice centre', async () => {
    const trapped = await report(scenario('frame-trap', { lattice: { shape: [16, 16] }, hubbard: { hopping: 0.01 }, trap: { coefficient: 0.004 }, particles: { chemicalPotential: 0.5 } }));
    const open = await report(scenario('frame-open', { lattice: { shape: [16, 16] }, hubbard: { hopping: 0.01 }, particles: { chemicalPotential: 0.5 } }));
    const caption = (d: ReportDocument) => (section(d, 'Shells and phases').blocks[0] as TableBlock).caption ?? '';
    expect(caption(trapped.doc)).toMatch(/trap-scaled radius/);
    expect(trapped.html).toMatch(/trap-scaled radius/);
    expect(caption(open.doc)).toMatch(/no trap: radii are distances from the lattice centre/i);
    expect(open.html).not.toMatch(/trap-scaled radius/);
    const row = (section(open.doc, 'Shells and phases').blocks[0] as TableBlock).rows[0];
    expect(row[0]).toBe('n = 1');
    expect(row[1]).toBe(256); // every site in the n = 1 shell
    expect(row[3]).toBe(0);
  });

  it('a periodic lattice without a trap has no centre: the shell is listed without radii', async () => {
    const torus = await report(scenario('frame-torus', { lattice: { shape: [16, 16], boundary: 'periodic' }, hubbard: { hopping: 0.01 }, particles: { chemicalPotential: 0.5 } }));
    const table = section(torus.doc, 'Shells and phases').blocks[0] as TableBlock;
    expect(table.rows[0][0]).toBe('n = 1');
    expect(table.rows[0][1]).toBe(256);
    expect(table.rows[0][3]).toBeNull();
    expect(table.rows[0][4]).toBeNull();
    expect(table.caption).toMatch(/no centre/);
    expect(torus.html).not.toMatch(/trap-scaled radius/);
    expect(torus.html).not.toMatch(/n=1 outer/);
  });
});
