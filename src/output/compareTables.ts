// The tables of `tiercake compare` as CSV with the column names on the first line (so that
// numpy.genfromtxt(f, delimiter=",", names=True) and pandas.read_csv(f) read them with no
// options), each with a metadata sidecar `<name>.csv-metadata.json` in the form of the W3C
// "Metadata Vocabulary for Tabular Data" (CSV on the Web, W3C Recommendation 2015): the
// table's title and notes and, per column, its name, unit and meaning. Writers only: every
// number comes from the fit (src/pipeline/compareFit.ts), the equation of state or the
// thermometry.

import { toCsv, type CsvColumn } from '../formats/csv.js';
import type { CompareFit } from '../pipeline/compareFit.js';
import type { EquationOfStateReading } from '../pipeline/compareEquationOfState.js';
import type { ThermometryReading } from '../pipeline/compareThermometry.js';
import type { PreparedShots } from '../pipeline/measuredShots.js';
import { toolVersion } from './toolVersion.js';

export interface TableColumn extends CsvColumn {
  unit?: string;
  description: string;
}

export interface WrittenTable {
  file: string;
  csv: string;
  /** The CSVW metadata sidecar's file name and text. */
  metadataFile: string;
  metadata: string;
}

/** A CSV and its CSVW metadata sidecar. */
export function tableFiles(file: string, title: string, notes: readonly string[], columns: readonly TableColumn[]): WrittenTable {
  const metadata = {
    '@context': 'http://www.w3.org/ns/csvw',
    url: file.split('/').pop(),
    'dc:title': title,
    'dc:creator': `tiercake ${toolVersion()}`,
    notes,
    tableSchema: {
      columns: columns.map((c) => ({
        name: c.name,
        titles: c.name,
        datatype: typeof c.values[0] === 'string' ? 'string' : 'number',
        ...(c.unit !== undefined ? { unit: c.unit } : {}),
        'dc:description': c.description,
      })),
    },
  };
  return { file, csv: toCsv(columns), metadataFile: `${file}-metadata.json`, metadata: `${JSON.stringify(metadata, null, 2)}\n` };
}

const lengthName = (c: CompareFit): string => (c.optics.lengthUnit.short === 'µm' ? 'um' : 'sites');

/** fit.csv: one row per reported parameter. */
export function fitTable(c: CompareFit): WrittenTable {
  const rows = c.parameters;
  const col = (name: string, description: string, values: ArrayLike<number | string>, unit?: string): TableColumn => ({ name, description, values, ...(unit !== undefined ? { unit } : {}) });
  return tableFiles(
    'fit.csv',
    `compare fit of ${c.prepared.scenario.name}`,
    [
      'uncertainty = uncertainty_from_sigma x max(1, sqrt(reduced chi-square)) (PDG scale-factor convention); the reduced chi-square counts the pixels where model or data stand above the noise',
      'centre rows are in pixels of the frame as given: x = column, y = row from the top',
      `reduced chi-square ${c.fit.reducedChiSquare} with ${c.fit.degreesOfFreedom} degrees of freedom`,
    ],
    [
      col('name', 'reported quantity', rows.map((r) => r.name)),
      col('unit', 'its unit', rows.map((r) => r.unit)),
      col('start', 'value the fit started from', rows.map((r) => r.start)),
      col('best', 'best-fit value', rows.map((r) => r.best)),
      col('uncertainty', 'standard uncertainty (noise model, enlarged by sqrt(chi2_nu) when above 1)', rows.map((r) => r.uncertainty)),
      col('uncertainty_from_sigma', 'standard uncertainty from the noise model alone', rows.map((r) => r.uncertaintyFromSigma)),
      col('uncertainty_scaled_by_reduced_chi_square', 'standard uncertainty always scaled by sqrt(chi2_nu)', rows.map((r) => r.uncertaintyScaledByReducedChiSquare)),
      col('bootstrap_uncertainty', 'standard deviation over bootstrap resamples of the shots (nan for one shot)', rows.map((r) => r.bootstrapUncertainty ?? NaN)),
      col('lower', 'lower bound of the fitted parameter in this unit (nan: none shown)', rows.map((r) => r.lower ?? NaN)),
      col('upper', 'upper bound of the fitted parameter in this unit (nan: none shown)', rows.map((r) => r.upper ?? NaN)),
      col('at_bound', '1 when the fit ended on a bound (the uncertainty is then not meaningful)', rows.map((r) => (r.atBound ? 1 : 0))),
    ],
  );
}

/** profiles.csv: the radial profiles of the fit. */
export function profileTable(c: CompareFit): WrittenTable {
  const p = c.profile;
  const unit = c.optics.lengthUnit.short;
  return tableFiles(
    'profiles.csv',
    `radial profiles of the measured picture and of ${c.prepared.scenario.name} at the best fit`,
    [`atoms per pixel, averaged over annular bins of ${c.binUm} ${unit} of the trap-scaled radius about the fitted trap centre`],
    [
      { name: `radius_${lengthName(c)}`, unit, description: 'mean trap-scaled radius of the pixels in the bin', values: p.radius },
      { name: 'bin_inner', unit, description: 'inner edge of the bin', values: p.binInner },
      { name: 'pixels', description: 'used pixels in the bin', values: p.pixels },
      { name: 'measured_mean', unit: 'atoms per pixel', description: 'mean of the measured picture (background subtracted)', values: p.measuredMean },
      { name: 'measured_standard_error', unit: 'atoms per pixel', description: 'error of the bin mean from the noise model, sqrt(sum sigma^2) / pixels', values: p.measuredError },
      { name: 'measured_scatter_error', unit: 'atoms per pixel', description: 'scatter of the pixels about the bin mean / sqrt(pixels)', values: p.measuredScatterError },
      { name: 'model_mean', unit: 'atoms per pixel', description: 'mean of the model picture at the best fit', values: p.modelMean },
      { name: 'model_band', unit: 'atoms per pixel', description: 'one standard uncertainty of the model profile from the covariance of the fit', values: p.modelBand },
    ],
  );
}

/** equation_of_state.csv. */
export function equationOfStateTable(c: CompareFit, eos: EquationOfStateReading): WrittenTable | null {
  if (!eos.available) return null;
  const e = eos.energyUnit;
  const d = eos.dimensions;
  const columns: TableColumn[] = [
    { name: 'radius_sites', unit: 'sites', description: 'trap-scaled radius of the bin', values: eos.radiusSites },
    { name: 'local_chemical_potential', unit: e, description: 'mu0 - V(r) (local density approximation)', values: eos.localChemicalPotential },
    { name: 'measured_density', unit: 'atoms per site', description: d === 2 ? 'azimuthal average of the layer density' : 'inverse Abel transform of the azimuthally averaged column', values: eos.measuredDensity },
    { name: 'measured_density_uncertainty', unit: 'atoms per site', description: 'standard uncertainty from the noise model (propagated through the inversion in 3D)', values: eos.measuredDensityError },
    { name: 'model_density', unit: 'atoms per site', description: 'the same analysis of the model picture at the best fit', values: eos.modelDensity },
    { name: 'homogeneous_density', unit: 'atoms per site', description: 'homogeneous Gutzwiller mean-field density at mu_local and the fitted temperature', values: eos.homogeneousDensity },
    { name: 'pressure', unit: `${e} per site${d === 2 ? ' area' : ' volume'}`, description: 'Gibbs-Duhem pressure from the measured points, integrated in from the last bin', values: eos.pressure },
  ];
  if (eos.latticeSpacingUm !== null) {
    const a = eos.latticeSpacingUm;
    const per = a ** d;
    columns.splice(3, 0, { name: d === 2 ? 'measured_density_per_um2' : 'measured_density_per_um3', unit: d === 2 ? 'atoms per µm^2' : 'atoms per µm^3', description: 'measured density per unit area or volume', values: Float64Array.from(eos.measuredDensity, (v) => v / per) });
  }
  return tableFiles(
    'equation_of_state.csv',
    `equation of state of ${c.prepared.scenario.name} read off the measured picture`,
    [eos.method, `mu0 = ${eos.centralChemicalPotential} ${e}, kT = ${eos.kT} ${e}; chi-square about the homogeneous curve ${eos.chiSquare} for ${eos.points} points`],
    columns,
  );
}

/** thermometry.csv: the radial bins of the fluctuation thermometry. */
export function thermometryTable(c: CompareFit, t: ThermometryReading): WrittenTable | null {
  if (!t.available) return null;
  const e = t.energyUnit;
  const b = t.bins;
  return tableFiles(
    'thermometry.csv',
    `fluctuation thermometry of ${t.shotCount} shots of ${c.prepared.scenario.name}`,
    [t.method, `kT = ${t.kT} ± ${t.kTUncertainty} ${e} from ${t.usableBins} bins; fitted kT = ${t.fittedKT} ${e}`],
    [
      { name: 'radius_sites', unit: 'sites', description: 'mean trap-scaled radius of the bin', values: b.map((x) => x.radiusSites) },
      { name: 'pixels', description: 'pixels in the bin', values: b.map((x) => x.pixels) },
      { name: 'potential', unit: e, description: 'mean trap potential of the bin', values: b.map((x) => x.potential) },
      { name: 'mean_atoms', unit: 'atoms', description: 'mean over shots of the atoms in the bin', values: b.map((x) => x.meanAtoms) },
      { name: 'variance_atoms', unit: 'atoms^2', description: 'variance over shots of the atoms in the bin', values: b.map((x) => x.varianceAtoms) },
      { name: 'imaging_variance_atoms', unit: 'atoms^2', description: 'imaging (photon and read) noise subtracted', values: b.map((x) => x.imagingVarianceAtoms) },
      { name: 'dN_dmu', unit: `atoms per ${e}`, description: 'd<N_b>/dmu from the mean profile', values: b.map((x) => x.atomsPerEnergy) },
      { name: 'kT', unit: e, description: 'kT of the bin (nan where not usable)', values: b.map((x) => x.kT) },
      { name: 'kT_uncertainty', unit: e, description: 'its standard uncertainty', values: b.map((x) => x.kTUncertainty) },
      { name: 'usable', description: '1 when the bin enters the combined kT', values: b.map((x) => (x.usable ? 1 : 0)) },
    ],
  );
}

/** shots.csv: one row per shot of a stack. */
export function shotsTable(c: CompareFit, shots: PreparedShots): WrittenTable {
  const rows = shots.perShot;
  const columns: TableColumn[] = [
    { name: 'shot', description: 'number of the shot in reading order', values: rows.map((_, k) => k) },
    { name: 'source', description: 'file (and dataset or frame) of the shot', values: rows.map((r) => r.label) },
    { name: 'atoms', unit: 'atoms', description: 'sum of the picture over the pixels used in every shot', values: rows.map((r) => r.atoms) },
    { name: 'hot_pixels_replaced', description: 'hot or dead pixels replaced in its raw frames', values: rows.map((r) => r.hotPixelsReplaced) },
  ];
  if (rows.some((r) => r.absorption !== undefined)) {
    columns.push(
      { name: 'beer_lambert_atoms', unit: 'atoms', description: 'part of the atoms from alpha ln(I0/I) (all used pixels)', values: rows.map((r) => r.absorption?.beerLambertAtoms ?? NaN) },
      { name: 'saturation_term_atoms', unit: 'atoms', description: 'part from (I0 - I)/I_sat (0 for plain Beer-Lambert)', values: rows.map((r) => r.absorption?.saturationTermAtoms ?? NaN) },
      { name: 'masked_od_limit', description: 'pixels above the optical-depth limit', values: rows.map((r) => r.absorption?.maskedCounts.opticalDepthLimit ?? NaN) },
      { name: 'masked_weak_probe', description: 'pixels with too few probe counts', values: rows.map((r) => r.absorption?.maskedCounts.weakProbe ?? NaN) },
    );
  }
  if (rows.some((r) => r.plane !== undefined)) {
    columns.push(
      { name: 'plane_offset', unit: 'atoms per pixel', description: 'background plane at the first pixel of the region (column 0, row 0)', values: rows.map((r) => r.plane?.offset ?? NaN) },
      { name: 'plane_slope_x', unit: 'atoms per pixel per column', description: 'its change per column of the region', values: rows.map((r) => r.plane?.slopeX ?? NaN) },
      { name: 'plane_slope_y', unit: 'atoms per pixel per row', description: 'its change per row of the region (rows counted downwards)', values: rows.map((r) => r.plane?.slopeY ?? NaN) },
      { name: 'plane_residual_rms', unit: 'atoms per pixel', description: 'scatter of the border pixels about the plane', values: rows.map((r) => r.plane?.residualRms ?? NaN) },
    );
  }
  if (c.shots !== null) {
    c.parameters.forEach((p, j) => {
      columns.push({ name: `${p.name}_linearised`, unit: p.unit, description: `${p.name} of this shot, one Gauss-Newton step from the fit of the mean picture`, values: (c.shots as NonNullable<CompareFit['shots']>).perShot.map((s) => s.values[j]) });
    });
  }
  return tableFiles('shots.csv', `the shots of the stack (${rows.length})`, [shots.method], columns);
}
