// A CSV table with its metadata beside it, in the W3C "CSV on the Web" form ("Metadata
// Vocabulary for Tabular Data" and "Model for Tabular Data and Metadata on the Web", W3C
// Recommendations, 17 December 2015). The CSV itself is plain: the header row of column
// names on the first line, then the data (csv.ts), so that
//   numpy.genfromtxt(f, delimiter=",", names=True)   and   pandas.read_csv(f)
// read it with no options. Everything else (title, description, each column's unit and
// meaning, notes) goes into the sidecar `<file>-metadata.json`, e.g. profiles.csv ->
// profiles.csv-metadata.json: the default location `{+url}-metadata.json` that a CSVW
// processor looks for next to a CSV file (Model for Tabular Data, section 5.3, recalled from
// memory).
//
// The metadata is a table description: "@context": "http://www.w3.org/ns/csvw", "url", a
// "tableSchema" whose "columns" list every column in order with its "name", "titles" (the
// header text), "datatype" ("double", "integer" or "string") and the common properties
// "dc:description" (Dublin Core) and "schema:unitText" (schema.org) for the unit; "null":
// "nan" says that nan marks a missing value; the table's "dc:title", "dc:description",
// "dc:creator" and "rdfs:comment" (free-text remarks) describe the whole. No unit ever hides in a column name
// alone: the unit is in the metadata, and names that carry a unit suffix (radius_um) agree
// with it.

import { toCsv, type CsvColumn } from './csv.js';

export interface CsvColumnSpec extends CsvColumn {
  /** what the column holds, one sentence */
  description: string;
  /** unit of the values ('1' for a pure number, '' for labels and counts without unit) */
  unit: string;
  /** CSVW datatype; default 'double' for numbers, 'string' for texts */
  datatype?: 'double' | 'integer' | 'string';
}

export interface CsvTableDescription {
  title: string;
  description: string;
  /** who wrote it, e.g. 'tiercake 0.1.0' */
  creator: string;
  /** further remarks, one sentence each */
  notes?: readonly string[];
}

export interface CsvTable {
  /** the CSV file's name, as given */
  file: string;
  /** the CSV text: header row first, no comments */
  csv: string;
  /** the sidecar's file name (same folder): `<file>-metadata.json` */
  metadataFile: string;
  /** the sidecar's JSON text */
  metadata: string;
}

/** CSVW column names: letters, digits and '_', not starting with '_' (reserved) or a digit here. */
const NAME = /^[A-Za-z][A-Za-z0-9_]*$/;

/** The CSV text of `columns` and its CSVW metadata, for a file named `file` (a bare name, e.g. 'profiles.csv'). */
export function csvTable(file: string, columns: readonly CsvColumnSpec[], table: CsvTableDescription): CsvTable {
  if (!/^[^/\\]+\.csv$/.test(file)) throw new Error(`csvTable: expected a bare file name ending in .csv, got ${JSON.stringify(file)}`);
  const seen = new Set<string>();
  for (const c of columns) {
    if (!NAME.test(c.name)) throw new Error(`csvTable: column name ${JSON.stringify(c.name)} must be letters, digits and '_' starting with a letter`);
    if (seen.has(c.name)) throw new Error(`csvTable: column name ${JSON.stringify(c.name)} appears twice`);
    seen.add(c.name);
  }
  const csv = toCsv(columns);
  const metadata = {
    '@context': 'http://www.w3.org/ns/csvw',
    url: file,
    'dc:title': table.title,
    'dc:description': table.description,
    'dc:creator': table.creator,
    dialect: { header: true, delimiter: ',', encoding: 'utf-8', lineTerminators: ['\n'] },
    null: 'nan',
    tableSchema: {
      columns: columns.map((c) => ({
        name: c.name,
        titles: c.name,
        datatype: c.datatype ?? (typeof c.values[0] === 'string' ? 'string' : 'double'),
        'dc:description': c.description,
        'schema:unitText': c.unit,
      })),
    },
    ...(table.notes !== undefined && table.notes.length > 0 ? { 'rdfs:comment': [...table.notes] } : {}),
  };
  return { file, csv, metadataFile: `${file}-metadata.json`, metadata: `${JSON.stringify(metadata, null, 2)}\n` };
}
