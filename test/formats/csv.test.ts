// CSV writer (src/io/csv.ts) against RFC 4180 ("Common Format and MIME Type for
// Comma-Separated Values Files", section 2: fields with commas, quotes or line breaks are
// enclosed in double quotes, and a quote inside is escaped by doubling it), against the
// ECMAScript guarantee that String(x) reads back as the same double, and against numpy's
// genfromtxt as a general-purpose reader (skipped when python3 with numpy is missing).

import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { toCsv } from '../../src/formats/csv.js';

describe('toCsv', () => {
  it('writes comment lines, one header row and one row per index', () => {
    const text = toCsv(
      [
        { name: 'r_um', values: [0, 0.5] },
        { name: 'density', values: Float64Array.of(2.5, 2.25) },
      ],
      ['tiercake radial profile', 'two lines\nin one comment'],
    );
    expect(text).toBe('# tiercake radial profile\n# two lines\n# in one comment\nr_um,density\n0,2.5\n0.5,2.25\n');
  });

  it('quotes fields as RFC 4180 section 2 prescribes', () => {
    const text = toCsv([{ name: 'label', values: ['plain', 'a,b', 'say "hi"', 'two\nlines', ' padded'] }]);
    expect(text.split('\n').slice(0, 4)).toEqual(['label', 'plain', '"a,b"', '"say ""hi"""']);
    expect(text).toContain('"two\nlines"');
    expect(text).toContain('" padded"');
  });

  it('writes numbers that read back as the same doubles', () => {
    const values = [0.1 + 0.2, 1 / 3, 6.02214076e23, 5e-324, -1.7976931348623157e308, -0, 123456789012345680000];
    const lines = toCsv([{ name: 'x', values }]).trim().split('\n').slice(1);
    lines.forEach((line, i) => expect(Object.is(Number(line), values[i])).toBe(true));
    expect(lines[5]).toBe('-0');
  });

  it('writes NaN as nan and infinities as INF, -INF (the xsd:double forms)', () => {
    expect(toCsv([{ name: 'x', values: [Number.NaN, Infinity, -Infinity] }])).toBe('x\nnan\nINF\n-INF\n');
  });

  it('explains unequal columns and a # that readers would take for a comment', () => {
    expect(() => toCsv([{ name: 'a', values: [1, 2] }, { name: 'b', values: [1] }])).toThrow(/column 'b' has 1 values but column 'a' has 2/);
    expect(() => toCsv([{ name: 'site #', values: [1] }])).toThrow(/contains '#'/);
  });

  it('is read back by numpy.genfromtxt with names, after skipping the comment lines', () => {
    let hasNumpy = true;
    try {
      execFileSync('python3', ['-c', 'import numpy'], { stdio: 'ignore' });
    } catch {
      hasNumpy = false;
    }
    if (!hasNumpy) return;
    const dir = mkdtempSync(join(tmpdir(), 'tiercake-csv-'));
    try {
      const file = join(dir, 'profile.csv');
      const x = [0.1 + 0.2, -2.5e-7, 1e300];
      writeFileSync(file, toCsv([{ name: 'r_um', values: x }, { name: 'n', values: [1, Number.NaN, 3] }], ['comment, with comma']));
      const script =
        'import numpy, sys, json\n' +
        // genfromtxt(names=True) takes the first line for the names even when it is a
        // comment, so the comment lines are skipped explicitly (numpy documentation of 'names').
        "d = numpy.genfromtxt(sys.argv[1], delimiter=',', names=True, comments='#', skip_header=1)\n" +
        "print(json.dumps({'names': list(d.dtype.names), 'r': [repr(float(v)) for v in d['r_um']], 'nan': bool(numpy.isnan(d['n'][1]))}))";
      const out = JSON.parse(execFileSync('python3', ['-c', script, file], { encoding: 'utf8' }));
      expect(out.names).toEqual(['r_um', 'n']);
      // Python's repr is also the shortest round-trip decimal, so the texts agree exactly.
      expect(out.r.map(Number)).toEqual(x);
      expect(out.nan).toBe(true);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
