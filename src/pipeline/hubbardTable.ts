// `tiercake hubbard`: a table of Hubbard parameters against lattice depth, for the terminal and
// as CSV. Pure: builds rows and strings, never prints or writes (the command wiring does that).
// Physics: src/physics/hubbardParameters.ts.

import { hubbardFromLab, type HubbardParameters } from '../physics/hubbardParameters.js';
import { ParameterError } from '../physics/parameterError.js';
import { resolveSpecies, type SpeciesInput } from '../physics/species.js';
import { csvTable, type CsvTable } from '../formats/csvTable.js';

export interface HubbardTableOptions {
  species: SpeciesInput;
  /** Lattice wavelength, nm (same for all lattice axes). */
  wavelengthNm: number;
  /** Depths to tabulate, E_r; every lattice axis gets the same depth. */
  depthsEr: readonly number[];
  /** Number of lattice axes (default 3: cubic lattice). */
  latticeDimension?: 1 | 2 | 3;
  /** Trap frequencies (Hz) of the 3 - latticeDimension axes without a lattice, e.g. [fz] for a 2D layer. */
  confinementFrequencyHz?: readonly number[];
}

export interface HubbardTableRow {
  depthEr: number;
  recoilHz: number;
  JHz: number;
  UHz: number;
  UoverJ: number;
  /** (U / zJ) / 5.83: 1 at the mean-field n = 1 transition. */
  UoverZJRelativeToCritical: number;
  wannierWidthNm: number;
  bandGapEr: number;
  /** J_2 / J (negative); 0 when J_2 is below round-off (see nnnResolved). */
  nnnOverNn: number;
  nnnResolved: boolean;
  /** Validity warnings of this row, in words. */
  warnings: string[];
}

/** n depths evenly spaced from fromEr to toEr inclusive. */
export function depthRangeEr(fromEr: number, toEr: number, count: number): number[] {
  if (!Number.isInteger(count) || count < 1) {
    throw new ParameterError('steps', `expected an integer >= 1, got ${String(count)}`);
  }
  if (count === 1) return [fromEr];
  return Array.from({ length: count }, (_, i) => fromEr + ((toEr - fromEr) * i) / (count - 1));
}

function rowFrom(depthEr: number, h: HubbardParameters): HubbardTableRow {
  const axis = h.latticeAxes[0]!;
  return {
    depthEr,
    recoilHz: axis.recoilHz,
    JHz: axis.tunnellingHz,
    UHz: h.interactionHz,
    UoverJ: h.uOverJ,
    UoverZJRelativeToCritical: h.uOverZJRelativeToCritical,
    wannierWidthNm: axis.wannierWidthNm,
    bandGapEr: axis.bandGapEr,
    nnnOverNn: axis.nnnOverNn,
    nnnResolved: axis.nextNearestResolved,
    warnings: h.warnings,
  };
}

/** One row per depth; the species is resolved once. */
export function hubbardTable(options: HubbardTableOptions): HubbardTableRow[] {
  const dimension = options.latticeDimension ?? 3;
  const species = resolveSpecies(options.species, 'species');
  if (options.depthsEr.length === 0) throw new ParameterError('depthsEr', 'expected at least one depth');
  return options.depthsEr.map((depthEr) =>
    rowFrom(
      depthEr,
      hubbardFromLab({
        species,
        wavelengthNm: options.wavelengthNm,
        depthEr: new Array<number>(dimension).fill(depthEr),
        confinementFrequencyHz: options.confinementFrequencyHz ?? [],
      }),
    ),
  );
}

interface Column {
  header: string;
  unit: string;
  csvName: string;
  /** unit for the CSV metadata when it is not `unit`, or '1' for a pure number (unit '') */
  csvUnit?: string;
  description: string;
  /** the text table's cell; four significant figures of `value` when not given */
  text?: (row: HubbardTableRow) => string;
  value: (row: HubbardTableRow) => number;
  integer?: boolean;
}

/** Four significant figures without exponent for ordinary magnitudes. */
function sig(value: number, digits = 4): string {
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e-3 && magnitude < 1e6) {
    const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
    return value.toFixed(decimals);
  }
  return value.toExponential(digits - 1);
}

const columns: Column[] = [
  { header: 'depth', unit: 'E_r', csvName: 'depth_Er', description: 'lattice depth per axis in recoil energies', value: (r) => r.depthEr },
  { header: 'E_r', unit: 'Hz', csvName: 'recoil_Hz', description: 'recoil energy h^2 / (2 m lambda^2), as energy/h', value: (r) => r.recoilHz },
  { header: 'J', unit: 'Hz', csvName: 'J_Hz', description: 'nearest-neighbour hopping J, as energy/h', value: (r) => r.JHz },
  { header: 'U', unit: 'Hz', csvName: 'U_Hz', description: 'on-site interaction U, as energy/h', value: (r) => r.UHz },
  { header: 'U/J', unit: '', csvName: 'U_over_J', description: 'U over J', value: (r) => r.UoverJ },
  {
    header: '(U/zJ)/5.83',
    unit: '',
    csvName: 'U_over_zJ_relative_to_mean_field_critical',
    description: '(U / zJ) / (3 + 2 sqrt 2): 1 at the mean-field n = 1 Mott transition',
    value: (r) => r.UoverZJRelativeToCritical,
  },
  {
    header: 'Wannier rms',
    unit: 'nm',
    csvName: 'wannier_rms_width_nm',
    description: 'rms width of |w(x)|^2 of the lowest-band Wannier function along a lattice axis',
    value: (r) => r.wannierWidthNm,
  },
  { header: 'band gap', unit: 'E_r', csvName: 'band_gap_Er', description: 'gap between the lowest two bands', value: (r) => r.bandGapEr },
  {
    header: 'J2/J',
    unit: '',
    csvName: 'nnn_over_nn',
    description: 'next-nearest hopping over nearest hopping (negative); 0 when below the round-off of the band energies (see nnn_resolved)',
    text: (r) => (r.nnnResolved ? sig(r.nnnOverNn, 3) : '~0'),
    value: (r) => r.nnnOverNn,
  },
  {
    header: 'J2 resolved',
    unit: '',
    csvName: 'nnn_resolved',
    csvUnit: '',
    description: '1 when the next-nearest hopping is above the numerical round-off, 0 when not',
    text: (r) => (r.nnnResolved ? 'yes' : 'no'),
    value: (r) => (r.nnnResolved ? 1 : 0),
    integer: true,
  },
];

/** Right-aligned text table with a units line, followed by the validity warnings of each row. */
export function formatHubbardTable(rows: readonly HubbardTableRow[]): string {
  const shown = columns.filter((c) => c.header !== 'J2 resolved');
  const cells = rows.map((row) => shown.map((c) => (c.text ? c.text(row) : sig(c.value(row)))));
  const headers = shown.map((c) => c.header);
  const units = shown.map((c) => (c.unit ? `[${c.unit}]` : ''));
  const widths = shown.map((_, i) =>
    Math.max(headers[i]!.length, units[i]!.length, ...cells.map((line) => line[i]!.length)),
  );
  const line = (parts: string[]): string => parts.map((p, i) => p.padStart(widths[i]!)).join('  ');
  const out = [line(headers), line(units), ...cells.map(line)];
  const notes = new Set<string>();
  for (const row of rows) for (const w of row.warnings) notes.add(`${sig(row.depthEr)} E_r: ${w}`);
  if (rows.some((r) => !r.nnnResolved)) {
    out.push('J2/J ~0: next-nearest hopping below the numerical round-off of the band energies (~1e-15 E_r).');
  }
  if (notes.size > 0) out.push('warnings:', ...[...notes].map((n) => `  ${n}`));
  return `${out.join('\n')}\n`;
}

/**
 * hubbard.csv with its CSV-on-the-Web metadata (src/formats/csvTable.ts): header row first,
 * full double precision, units and meaning of every column in hubbard.csv-metadata.json.
 */
export function hubbardCsvTable(rows: readonly HubbardTableRow[], about: { species: string; wavelengthNm: number; creator: string }): CsvTable {
  const warnings = [...new Set(rows.flatMap((r) => r.warnings.map((w) => `${sig(r.depthEr)} E_r: ${w}`)))];
  return csvTable(
    'hubbard.csv',
    columns.map((c) => ({
      name: c.csvName,
      values: rows.map((r) => c.value(r)),
      unit: c.csvUnit ?? (c.unit === '' ? '1' : c.unit),
      description: c.description,
      ...(c.integer ? { datatype: 'integer' as const } : {}),
    })),
    {
      title: `Hubbard parameters against lattice depth, ${about.species} at ${about.wavelengthNm} nm`,
      description: 'J and U from the band structure and the maximally localised Wannier functions of the lattice, one row per depth',
      creator: about.creator,
      ...(warnings.length > 0 ? { notes: warnings.map((w) => `validity warning at ${w}`) } : {}),
    },
  );
}

/** The CSV text of hubbardCsvTable (header row first). */
export function hubbardCsv(rows: readonly HubbardTableRow[]): string {
  return hubbardCsvTable(rows, { species: '', wavelengthNm: 0, creator: '' }).csv;
}
