// The lines `compare` prints on stdout when it is done: what was compared, whether the fit
// converged, every reported parameter with its uncertainty (and the bootstrap's, for a
// stack), the reduced chi-square with its degrees of freedom and which pixels it counts, the
// caution of plain Beer-Lambert, the fluctuation thermometry of a stack, and where the
// results are. Pure text; the command writes it.

import { sourceShortName } from '../imaging/camera/frameAddress.js';
import type { CompareFit } from '../pipeline/compareFit.js';
import type { ThermometryReading } from '../pipeline/compareThermometry.js';
import type { MeasurementSettings } from '../pipeline/measuredShots.js';

export interface CompareSummaryInput {
  scenarioName: string;
  /** The measured source as given (--image, --absorption-frames or --shots). */
  imagePath: string;
  result: Pick<CompareFit, 'parameters' | 'fit'>;
  measurement: MeasurementSettings;
  thermometry: ThermometryReading;
  /** The results folder. */
  outPath: string;
}

export function compareSummaryLines(s: CompareSummaryInput): string[] {
  const { result, measurement, thermometry } = s;
  const shown = (r: (typeof result.parameters)[number]) =>
    `  ${r.name} = ${r.best.toPrecision(6)} ± ${r.uncertainty.toPrecision(2)}${r.bootstrapUncertainty !== null ? ` (bootstrap ± ${r.bootstrapUncertainty.toPrecision(2)})` : ''}${r.name === 'atoms' ? '' : ` ${r.unit}`}`;
  return [
    `${s.scenarioName}: compared with ${sourceShortName(s.imagePath)} (${result.fit.converged ? 'fit converged' : 'fit NOT converged'}, ${result.fit.solves} solves)`,
    ...result.parameters.map(shown),
    `  reduced chi-square ${result.fit.reducedChiSquare.toPrecision(4)} (${result.fit.degreesOfFreedom} degrees of freedom, ${result.fit.chiSquarePixels === 'signal' ? 'pixels above the noise' : 'all used pixels'})`,
    ...(measurement.kind === 'absorption' && measurement.saturationCounts === undefined ? ['  plain Beer-Lambert (no --saturation-counts): atom numbers are low unless the probe is far below saturation'] : []),
    ...(thermometry.available
      ? [
          thermometry.usableBins > 0
            ? `  fluctuation thermometry: kT = ${thermometry.kT.toPrecision(4)} ± ${thermometry.kTUncertainty.toPrecision(2)} ${thermometry.energyUnit} (${thermometry.usableBins} bins, ${thermometry.shotCount} shots)`
            : `  fluctuation thermometry: no temperature, no radial bin was usable (${thermometry.shotCount} shots; warning no-usable-bins)`,
        ]
      : []),
    `  results in ${s.outPath}`,
  ];
}
