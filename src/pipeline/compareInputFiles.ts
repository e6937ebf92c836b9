// The files a `compare` run reads, as its output folder must not hold any of them
// (src/output/outputTarget.ts): the scenario, the measured sources (the shot files of
// --shots, which then name frames inside each file; else the files of --image,
// --absorption-frames and --background-frame) and the region mask. Known from the option
// text alone, before any frame is read.

import { sourceAddresses } from '../imaging/camera/frameAddress.js';

export interface CompareSourceTexts {
  shots?: string;
  image?: string;
  absorptionFrames?: string;
  backgroundFrame?: string;
  regionMask?: string;
}

/** Files named by a source text: the file of a dataset address (file.h5:/atoms), folders as they are. */
export function sourceFiles(text: string | undefined): string[] {
  return text === undefined ? [] : sourceAddresses(text).map((a) => a.file).filter((f) => f.length > 0);
}

export function compareInputFiles(scenarioPath: string, o: CompareSourceTexts): string[] {
  const measured = o.shots !== undefined ? sourceFiles(o.shots) : [...sourceFiles(o.image), ...sourceFiles(o.absorptionFrames), ...sourceFiles(o.backgroundFrame)];
  return [scenarioPath, ...measured, ...sourceFiles(o.regionMask)];
}
