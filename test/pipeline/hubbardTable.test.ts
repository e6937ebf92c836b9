// The hubbard table of `tiercake hubbard` (src/pipeline/hubbardTable.ts): rows are the
// physics of src/physics/hubbardParameters.ts unchanged, J falls and U grows with depth,
// and the deep-lattice J follows the asymptotic Wannier-overlap form
// J / E_r = (4 / sqrt(pi)) s^(3/4) exp(-2 sqrt(s)) (Zwerger, J. Opt. B 5, S9 (2003), eq. 6)
// up to its corrections of relative order 1/sqrt(s): the exact J lies below it and the ratio
// rises toward 1 with depth (here 0.89 at 20 E_r, 0.92 at 30 E_r).

import { describe, expect, it } from 'vitest';
import { depthRangeEr, formatHubbardTable, hubbardCsv, hubbardCsvTable, hubbardTable } from '../../src/pipeline/hubbardTable.js';
import { hubbardFromLab } from '../../src/physics/hubbardParameters.js';
import { ParameterError } from '../../src/physics/parameterError.js';

describe('hubbard table for the command line', () => {
  it('rows, aligned text and a CSV with units in the header', () => {
    const depths = depthRangeEr(5, 25, 5);
    expect(depths).toEqual([5, 10, 15, 20, 25]);
    const rows = hubbardTable({ species: '87Rb', wavelengthNm: 852, depthsEr: depths });
    expect(rows).toHaveLength(5);
    for (let i = 1; i < rows.length; i++) {
      expect(rows[i]!.JHz).toBeLessThan(rows[i - 1]!.JHz);
      expect(rows[i]!.UHz).toBeGreaterThan(rows[i - 1]!.UHz);
    }
    const direct = hubbardFromLab({ species: '87Rb', wavelengthNm: 852, depthEr: 15 });
    expect(rows[2]!.UoverJ).toBe(direct.uOverJ);
    expect(rows[2]!.UoverZJRelativeToCritical).toBe(direct.uOverZJRelativeToCritical);

    const csv = hubbardCsv(rows).trimEnd().split('\n');
    expect(csv[0]).toBe(
      'depth_Er,recoil_Hz,J_Hz,U_Hz,U_over_J,U_over_zJ_relative_to_mean_field_critical,wannier_rms_width_nm,band_gap_Er,nnn_over_nn,nnn_resolved',
    );
    expect(csv).toHaveLength(6);
    expect(Number(csv[3]!.split(',')[2])).toBe(rows[2]!.JHz);

    const text = formatHubbardTable(rows).trimEnd().split('\n');
    const tableLines = text.slice(0, 2 + rows.length);
    for (const line of tableLines) expect(line.length).toBe(tableLines[0]!.length);
    expect(text[1]).toContain('[Hz]');
  });

  it('2D layer rows', () => {
    const rows = hubbardTable({
      species: { name: '39K', scatteringLengthBohr: 120 },
      wavelengthNm: 1064,
      depthsEr: [10],
      latticeDimension: 2,
      confinementFrequencyHz: [10000],
    });
    expect(rows[0]!.UHz).toBeGreaterThan(0);
    expect(() => hubbardTable({ species: '87Rb', wavelengthNm: 1064, depthsEr: [] })).toThrow(/depthsEr/);
  });
});

describe('hubbard.csv metadata', () => {
  it('units of every column, written out here: pure numbers as "1", the resolved flag as an integer with no unit', () => {
    const rows = hubbardTable({ species: '87Rb', wavelengthNm: 852, depthsEr: [10] });
    const meta = JSON.parse(hubbardCsvTable(rows, { species: '87Rb', wavelengthNm: 852, creator: 'test' }).metadata) as {
      tableSchema: { columns: Array<{ name: string; datatype: string; 'schema:unitText': string }> };
    };
    const units = Object.fromEntries(meta.tableSchema.columns.map((c) => [c.name, c['schema:unitText']]));
    expect(units).toEqual({
      depth_Er: 'E_r', recoil_Hz: 'Hz', J_Hz: 'Hz', U_Hz: 'Hz', U_over_J: '1', U_over_zJ_relative_to_mean_field_critical: '1',
      wannier_rms_width_nm: 'nm', band_gap_Er: 'E_r', nnn_over_nn: '1', nnn_resolved: '',
    });
    expect(meta.tableSchema.columns.at(-1)!.datatype).toBe('integer');
  });
});

describe('hubbard table against the deep-lattice asymptote', () => {
  it('J / E_r approaches (4 / sqrt(pi)) s^(3/4) exp(-2 sqrt(s)) from below as the lattice deepens', () => {
    const rows = hubbardTable({ species: '87Rb', wavelengthNm: 1064, depthsEr: [10, 20, 30, 40] });
    const ratios = rows.map((row) => {
      const s = row.depthEr;
      return row.JHz / row.recoilHz / ((4 / Math.sqrt(Math.PI)) * s ** 0.75 * Math.exp(-2 * Math.sqrt(s)));
    });
    // Corrections of order 1/sqrt(s): 0.8 .. 1 from 10 E_r on, rising with depth.
    for (const r of ratios) {
      expect(r).toBeGreaterThan(0.8);
      expect(r).toBeLessThan(1);
    }
    for (let k = 1; k < ratios.length; k++) expect(ratios[k]).toBeGreaterThan(ratios[k - 1]);
    expect(() => depthRangeEr(1, 2, 0)).toThrow(ParameterError);
    expect(depthRangeEr(7, 9, 1)).toEqual([7]);
  });
});
