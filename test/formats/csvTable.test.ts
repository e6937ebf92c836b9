// CSV tables with CSV-on-the-Web metadata (src/formats/csvTable.ts), against the readers the
// issue names: numpy.genfromtxt(f, delimiter=",", names=True) with no further options (run
// when python3 with numpy is installed; pandas is checked too when it is), and the table
// description of the W3C Recommendation "Metadata Vocabulary for Tabular Data" (2015): an
// "@context" of http://www.w3.org/ns/csvw, the "url" of the CSV, and a tableSchema whose
// columns carry, in order, the names of the CSV's header row.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { csvTable } from '../../src/formats/csvTable.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-csvw-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function python(modules: string): boolean {
  try {
    execFileSync('python3', ['-c', `import ${modules}`], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

const table = () =>
  csvTable(
    'profile.csv',
    [
      { name: 'radius_sites', values: [0.5, 1.5, 2.5], unit: 'lattice spacings', description: 'mean radius' },
      { name: 'radius_um', values: [Number.NaN, Number.NaN, Number.NaN], unit: 'um', description: 'the same in micrometres; nan without a lattice spacing' },
      { name: 'sites', values: [4, 12, 20], unit: '', datatype: 'integer', description: 'sites in the bin' },
      { name: 'density_mean', values: [2, 1.000000001, 0.1 + 0.2], unit: 'atoms per site', description: 'mean density' },
    ],
    { title: 'a profile', description: 'three bins', creator: 'tiercake test', notes: ['a note, with a comma'] },
  );

describe('csvTable', () => {
  it('puts the header row on the first line and writes no comments', () => {
    const t = table();
    const lines = t.csv.split('\n');
    expect(lines[0]).toBe('radius_sites,radius_um,sites,density_mean');
    expect(t.csv).not.toContain('#');
    expect(lines[1]).toBe('0.5,nan,4,2');
    expect(t.file).toBe('profile.csv');
  });

  it('describes the table in CSVW form: context, url, every header column in order with unit and meaning', () => {
    const t = table();
    expect(t.metadataFile).toBe('profile.csv-metadata.json');
    const m = JSON.parse(t.metadata);
    expect(m['@context']).toBe('http://www.w3.org/ns/csvw');
    expect(m.url).toBe('profile.csv');
    expect(m.null).toBe('nan');
    const columns = m.tableSchema.columns as Array<Record<string, string>>;
    expect(columns.map((c) => c.name)).toEqual(t.csv.split('\n')[0].split(','));
    expect(columns.map((c) => c.titles)).toEqual(columns.map((c) => c.name));
    expect(columns.map((c) => c.datatype)).toEqual(['double', 'double', 'integer', 'double']);
    expect(columns[1]['schema:unitText']).toBe('um');
    expect(columns.every((c) => typeof c['dc:description'] === 'string' && c['dc:description'].length > 0)).toBe(true);
    expect(m['rdfs:comment']).toEqual(['a note, with a comma']);
    expect(m['dc:title']).toBe('a profile');
  });

  it('refuses names a CSVW processor or numpy would mangle, and repeated names', () => {
    expect(() => csvTable('x.csv', [{ name: 'density mean', values: [1], unit: '', description: 'd' }], { title: 't', description: 'd', creator: 'c' })).toThrow(/letters, digits and '_'/);
    expect(() => csvTable('x.csv', [{ name: '_hidden', values: [1], unit: '', description: 'd' }], { title: 't', description: 'd', creator: 'c' })).toThrow();
    expect(() =>
      csvTable('x.csv', [{ name: 'a', values: [1], unit: '', description: 'd' }, { name: 'a', values: [1], unit: '', description: 'd' }], { title: 't', description: 'd', creator: 'c' }),
    ).toThrow(/appears twice/);
    expect(() => csvTable('sub/x.csv', [{ name: 'a', values: [1], unit: '', description: 'd' }], { title: 't', description: 'd', creator: 'c' })).toThrow(/bare file name/);
  });

  it('numpy.genfromtxt(f, delimiter=",", names=True) and pandas.read_csv(f) read it with no other option', () => {
    if (!python('numpy')) return;
    const t = table();
    const file = join(dir, 'profile.csv');
    writeFileSync(file, t.csv);
    const script =
      'import numpy, sys, json\n' +
      "d = numpy.genfromtxt(sys.argv[1], delimiter=',', names=True)\n" +
      "print(json.dumps({'names': list(d.dtype.names), 'r': [repr(float(v)) for v in d['radius_sites']], 'um_nan': bool(numpy.isnan(d['radius_um']).all()), 'n': [repr(float(v)) for v in d['density_mean']]}))";
    const out = JSON.parse(execFileSync('python3', ['-c', script, file], { encoding: 'utf8' }));
    expect(out.names).toEqual(['radius_sites', 'radius_um', 'sites', 'density_mean']);
    expect(out.r.map(Number)).toEqual([0.5, 1.5, 2.5]);
    expect(out.um_nan).toBe(true);
    // Full precision: Python's repr is the shortest round-trip decimal too.
    expect(out.n.map(Number)).toEqual([2, 1.000000001, 0.1 + 0.2]);
    if (!python('pandas')) return; // not installed on every machine; numpy above is the check that always runs here
    const pandas = execFileSync('python3', ['-c', "import pandas, sys, json; d = pandas.read_csv(sys.argv[1]); print(json.dumps(list(d.columns)))", file], { encoding: 'utf8' });
    expect(JSON.parse(pandas)).toEqual(['radius_sites', 'radius_um', 'sites', 'density_mean']);
  });
});
