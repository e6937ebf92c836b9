// Comma-separated values for profiles and tables (RFC 4180 quoting). tiercake's own tables
// (csvTable.ts) have the header row on the first line and their metadata in a W3C CSV on the
// Web sidecar, so numpy.genfromtxt(f, delimiter=',', names=True) and pandas.read_csv(f)
// read them with no options. Comment lines ('# ') are still supported here for callers
// that have not moved to csvTable (readers must then skip them).
//
// Layout: optional comment lines starting with '# ', one header row of column names,
// then one row per index. Numbers are written with String(x), the shortest decimal that
// reads back as exactly the same double (ECMAScript Number::toString; '-0' keeps the sign),
// so nothing is lost. NaN (a missing value: an empty bin, a length without a lattice
// spacing) is written 'nan', which numpy and pandas read as NaN and which the CSVW
// metadata declares as the null value; infinities as 'INF' and '-INF', the lexical forms
// of xsd:double (W3C XML Schema 1.1 Part 2, section 3.3.5), which Python's float() and so
// numpy also read.
// A field is quoted when it holds a comma, a double quote, a line break or edge spaces,
// with inner quotes doubled (RFC 4180, section 2). Lines end with '\n'. A '#' inside a
// name or text value is refused: numpy and pandas with comment='#' would cut the line there.

export interface CsvColumn {
  name: string;
  values: ArrayLike<number | string>;
}

function formatNumber(x: number): string {
  if (Number.isNaN(x)) return 'nan';
  if (x === Infinity) return 'INF';
  if (x === -Infinity) return '-INF';
  return Object.is(x, -0) ? '-0' : String(x);
}

function quoteField(text: string, where: string): string {
  if (text.includes('#')) {
    throw new Error(`toCsv: ${where} contains '#', which numpy and pandas read as the start of a comment; remove it`);
  }
  return /[",\r\n]|^\s|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * Build a CSV text from equally long columns, with optional comment lines (each given
 * line may itself contain line breaks; every resulting line gets the '# ' prefix).
 */
export function toCsv(columns: readonly CsvColumn[], headerComment: readonly string[] = []): string {
  if (columns.length === 0) throw new Error('toCsv: expected at least one column');
  const rows = columns[0].values.length;
  for (const c of columns) {
    if (c.values.length !== rows) {
      throw new Error(`toCsv: column '${c.name}' has ${c.values.length} values but column '${columns[0].name}' has ${rows}; give every column the same length`);
    }
  }
  const lines: string[] = [];
  for (const comment of headerComment) {
    for (const line of comment.split(/\r\n|\r|\n/)) lines.push(line.length > 0 ? `# ${line}` : '#');
  }
  lines.push(columns.map((c) => quoteField(c.name, `column name '${c.name}'`)).join(','));
  for (let i = 0; i < rows; i++) {
    lines.push(
      columns
        .map((c) => {
          const v = c.values[i];
          return typeof v === 'number' ? formatNumber(v) : quoteField(String(v), `column '${c.name}', row ${i}`);
        })
        .join(','),
    );
  }
  return lines.join('\n') + '\n';
}
