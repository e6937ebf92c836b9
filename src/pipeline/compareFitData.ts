// The data the compare fit takes from the measured picture: the used pixels, and the picture
// with its background removed, in atoms per pixel on the model's grid. The background of a
// picture is the median of its border pixels (compareFitNoise.ts); for a stack every shot
// loses its own, so a drifting offset does not enter the mean, and the fitted data are the
// mean of the shots. When the fit has an offset parameter, nothing is subtracted: the offset
// is the background, started at the border median.

import type { MeasuredImage } from '../imaging/measuredImage.js';
import { borderBackground } from './compareFitNoise.js';

export interface FitData {
  /** Grid indices of the used pixels, in order. */
  usedIndex: Int32Array;
  /** Background-subtracted picture (NaN where masked), grid layout. */
  data: Float64Array;
  /** The same on the used pixels. */
  dataUsed: Float64Array;
  /** What was subtracted (mean over the shots), atoms per pixel; 0 when the offset is fitted. */
  background: number;
  /** Median of the border pixels (mean over the shots), whether subtracted or not. */
  borderLevel: number;
  /** Each shot of a stack on the used pixels, background-subtracted, and its atoms there. */
  shotData: Float64Array[];
  shotAtoms: number[];
}

export function fitData(measured: MeasuredImage, shots: readonly Float64Array[] | null, subtract: boolean): FitData {
  const { nx, ny, mask } = measured;
  const usedIndex = new Int32Array(measured.usedPixels);
  for (let q = 0, u = 0; q < mask.length; q++) if (mask[q] !== 0) usedIndex[u++] = q;
  const data = new Float64Array(nx * ny).fill(NaN);
  const shotData: Float64Array[] = [];
  const shotAtoms: number[] = [];
  let background = 0;
  let borderLevel = 0;
  if (shots !== null) {
    for (const shot of shots) {
      const level = borderBackground({ values: shot, nx, ny }, mask).background;
      borderLevel += level / shots.length;
      const b = subtract ? level : 0;
      background += b / shots.length;
      const d = new Float64Array(usedIndex.length);
      let atoms = 0;
      for (let u = 0; u < d.length; u++) {
        d[u] = shot[usedIndex[u]] - b;
        atoms += d[u];
      }
      shotData.push(d);
      shotAtoms.push(atoms);
    }
    for (let u = 0; u < usedIndex.length; u++) {
      let s = 0;
      for (const d of shotData) s += d[u];
      data[usedIndex[u]] = s / shots.length;
    }
  } else {
    borderLevel = borderBackground(measured, mask).background;
    background = subtract ? borderLevel : 0;
    for (const q of usedIndex) data[q] = measured.values[q] - background;
  }
  const dataUsed = Float64Array.from(usedIndex, (q) => data[q]);
  return { usedIndex, data, dataUsed, background, borderLevel, shotData, shotAtoms };
}
