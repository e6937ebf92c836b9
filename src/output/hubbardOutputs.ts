// Files of `tiercake hubbard`: the table as CSV and as text, and a plot of J and U against
// lattice depth. Writers only: the numbers come from src/pipeline/hubbardTable.ts.

import { encodeRgba8 } from '../formats/pngCodec.js';
import { renderLinePlot } from '../figures/linePlotFigure.js';
import { hubbardCsv, type hubbardTable } from '../pipeline/hubbardTable.js';
import type { OutputFolder } from './outputFolder.js';

export type HubbardRows = ReturnType<typeof hubbardTable>;

/** Stage hubbard.csv, hubbard.png and hubbard.txt in `folder` (the caller commits it). */
export function writeHubbardFiles(rows: HubbardRows, text: string, title: { speciesName: string; wavelengthNm: number }, folder: OutputFolder): void {
  const plot = renderLinePlot(
    [
      { label: 'J (Hz)', x: rows.map((r) => r.depthEr), y: rows.map((r) => r.JHz) },
      { label: 'U (Hz)', x: rows.map((r) => r.depthEr), y: rows.map((r) => r.UHz) },
    ],
    { title: `Hubbard parameters, ${title.speciesName} at ${title.wavelengthNm} nm`, xLabel: 'lattice depth (E_r)', yLabel: 'energy / h (Hz)', logY: true },
  );
  folder.write('hubbard.csv', hubbardCsv(rows));
  folder.write('hubbard.png', encodeRgba8(plot.width, plot.height, plot.data));
  folder.write('hubbard.txt', text);
}
