// `tiercake hubbard`: a table of Hubbard parameters against lattice depth, for the terminal and
// as CSV. Pure: builds rows and strings, never prints or writes (the command wiring does that).
// Physics: src/physics/hubbardParameters.ts.

import { hubbardFromLab, type HubbardParameters } from '../physics/hubbardParameters.js';
import { ParameterError } from '../physics/parameterError.js';
import { resolveSpecies, type SpeciesInput } from '../physics/species.js';

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
  text: (row: HubbardTableRow) => string;
  csv: (row: HubbardTableRow) => string;
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

/** Full double precision for files, so that a reader loses nothing. */
function full(value: number): string {
  return String(value);
}

const columns: Column[] = [
  { header: 'depth', unit: 'E_r', csvName: 'depth_Er', text: (r) => sig(r.depthEr), csv: (r) => full(r.depthEr) },
  { header: 'E_r', unit: 'Hz', csvName: 'recoil_Hz', text: (r) => sig(r.recoilHz), csv: (r) => full(r.recoilHz) },
  { header: 'J', unit: 'Hz', csvName: 'J_Hz', text: (r) => sig(r.JHz), csv: (r) => full(r.JHz) },
  { header: 'U', unit: 'Hz', csvName: 'U_Hz', text: (r) => sig(r.UHz), csv: (r) => full(r.UHz) },
  { header: 'U/J', unit: '', csvName: 'U_over_J', text: (r) => sig(r.UoverJ), csv: (r) => full(r.UoverJ) },
  {
    header: '(U/zJ)/5.83',
    unit: '',
    csvName: 'U_over_zJ_relative_to_mean_field_critical',
    text: (r) => sig(r.UoverZJRelativeToCritical),
    csv: (r) => full(r.UoverZJRelativeToCritical),
  },
  { header: 'Wannier rms', unit: 'nm', csvName: 'wannier_rms_width_nm', text: (r) => sig(r.wannierWidthNm), csv: (r) => full(r.wannierWidthNm) },
  { header: 'band gap', unit: 'E_r', csvName: 'band_gap_Er', text: (r) => sig(r.bandGapEr), csv: (r) => full(r.bandGapEr) },
  {
    header: 'J2/J',
    unit: '',
    csvName: 'nnn_over_nn',
    text: (r) => (r.nnnResolved ? sig(r.nnnOverNn, 3) : '~0'),
    csv: (r) => full(r.nnnOverNn),
  },
  { header: 'J2 resolved', unit: '', csvName: 'nnn_resolved', text: (r) => (r.nnnResolved ? 'yes' : 'no'), csv: (r) => (r.nnnResolved ? '1' : '0') },
];

/** Right-aligned text table with a units line, followed by the validity warnings of each row. */
export function formatHubbardTable(rows: readonly HubbardTableRow[]): string {
  const shown = columns.filter((c) => c.header !== 'J2 resolved');
  const cells = rows.map((row) => shown.map((c) => c.text(row)));
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

/** CSV with a header row naming every column with its unit. */
export function hubbardCsv(rows: readonly HubbardTableRow[]): string {
  const header = columns.map((c) => c.csvName).join(',');
  const body = rows.map((row) => columns.map((c) => c.csv(row)).join(','));
  return `${[header, ...body].join('\n')}\n`;
}
