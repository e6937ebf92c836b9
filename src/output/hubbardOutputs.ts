// Files of `tiercake hubbard`: the table as CSV and as text, and a plot of J and U against
// lattice depth. Writers only: the numbers come from src/pipeline/hubbardTable.ts.

import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { hubbardCsvTable, type hubbardTable } from '../pipeline/hubbardTable.js';
import { toolVersion } from './toolVersion.js';
import { writeOutputFolder, type CommitReport, type OutputFolder } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { cautionsShownFor } from './outputMarker.js';

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

/** Marker name of the laser-safety caution (outputMarker.ts `cautions`). */
export const LASER_CAUTION_ID = 'laser-safety';

/**
 * The laser caution goes with the depth estimate once per output folder: always into
 * hubbard.txt and the folder's marker; on the terminal when the folder is new (or its marker
 * does not record it) and on every run without --out (there is no folder to keep it).
 */
export function laserCautionShownBefore(target: OutputTarget | null): boolean {
  return target !== null && target.existing.kind === 'owned' && cautionsShownFor(target.path).includes(LASER_CAUTION_ID);
}

/** Write the folder of a hubbard run: the table files and hubbard.txt holding `fileText` (the text and its caution). */
export async function writeHubbardFolder(
  target: OutputTarget,
  rows: HubbardRows,
  fileText: string,
  about: { speciesName: string; wavelengthNm: number; laserCaution: boolean },
): Promise<CommitReport | null> {
  const identity = { command: 'hubbard', scenarioHash: null, ...(about.laserCaution ? { cautions: [LASER_CAUTION_ID] } : {}) };
  const { commit } = await writeOutputFolder(target, identity, (folder) => writeHubbardFiles(rows, fileText, about, folder));
  return commit;
}
