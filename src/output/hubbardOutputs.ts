// Files of `tiercake hubbard`: the table as CSV and as text, and a plot of J and U against
// lattice depth. Writers only: the numbers come from src/pipeline/hubbardTable.ts.

import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { hubbardCsvTable, type hubbardTable } from '../pipeline/hubbardTable.js';
import { toolVersion } from './toolVersion.js';
import type { OutputFolder } from './outputFolder.js';

export type HubbardRows = ReturnType<typeof hubbardTable>;

/** Stage hubbard.csv (+ its CSVW metadata), hubbard.png and hubbard.txt in `folder` (the caller commits it). */
export function writeHubbardFiles(rows: HubbardRows, text: string, title: { speciesName: string; wavelengthNm: number }, folder: OutputFolder): void {
  const depth = rows.map((r) => r.depthEr);
  const svg = renderLinePlotSvg({
    title: `Hubbard parameters, ${title.speciesName} at ${title.wavelengthNm} nm`,
    xAxis: { label: 'lattice depth', unit: 'E_r' },
    yAxis: { label: 'energy / h', unit: 'Hz', log: true },
    series: [
      { label: 'tunnelling J', x: depth, y: rows.map((r) => r.JHz) },
      { label: 'on-site interaction U', x: depth, y: rows.map((r) => r.UHz) },
    ],
  });
  const table = hubbardCsvTable(rows, { species: title.speciesName, wavelengthNm: title.wavelengthNm, creator: `tiercake ${toolVersion()}` });
  folder.write(table.file, table.csv);
  folder.write(table.metadataFile, table.metadata);
  folder.write('hubbard.png', svgToPng(svg));
  folder.write('hubbard.txt', text);
}
