// Warnings about readings that cannot be trusted as they stand (issue "say when a reading
// cannot be trusted"): a pure function of a solved cloud returning `{code, message}` items,
// for summary.json `warnings`, stderr and the top of the report. Codes (stable interface):
//
// - `cloud-at-edge`: along an open, trapped axis the density on a face layer of the lattice
//   exceeds 1e-3 atoms per site: the cloud is cut by the lattice edge and atoms that the trap
//   would hold beyond it are missing (or piled up on the face). The message names the atoms on
//   the faces and a lattice length that would hold the cloud: where the local chemical
//   potential mu - k_d (x_d - c_d)^2 reaches the edge of the cloud, mu_edge = -zJ at T = 0 (the
//   vacuum is stable below it in mean field) and -zJ + kT ln(1e-3) at T > 0 (thermal tail
//   n ~ e^{mu_loc/kT} of the atomic limit), plus two sites of margin on each side. An axis
//   without a trap has its open faces as walls by design and is not checked.
// - `empty-cloud`: fewer than 1e-6 atoms in the whole lattice; every fraction (condensate
//   fraction, atom fractions, visibility) is then undefined and must be reported as null.
// - `truncation`: the weight of |nmax> exceeds the allowed topWeightMax at some site.
// - `not-converged`: the self-consistency, the atom-number or the temperature search did not
//   reach its tolerance (or the run was stopped).

export type ReadingWarningCode = 'cloud-at-edge' | 'empty-cloud' | 'truncation' | 'not-converged' | 'cluster-eigensolve' | 'cluster-thermal-truncation';

export interface ReadingWarning {
  code: ReadingWarningCode;
  message: string;
}

export interface ReadingWarningInput {
  shape: readonly number[];
  periodic: readonly boolean[];
  density: Float64Array;
  /** total atom number of the solution */
  atoms: number;
  convergence: {
    converged: boolean;
    stopped: boolean;
    /** last max |delta phi| and its tolerance */
    residual: number;
    tolerance: number;
    sweeps: number;
    /** atom-number search (null when mu was given) */
    muSearchConverged: boolean | null;
    /** entropy search (null when T was given) */
    temperatureSearchConverged: boolean | null;
  };
  truncation: { nmax: number; maxTopWeight: number; topWeightMax: number };
  /** trap and chemical potential, for the lattice size that would hold the cloud */
  trap?: {
    /** k_d per axis (energy per site^2, 0 where untrapped) */
    coefficient: readonly number[];
    /** trap centre per axis, site coordinates */
    centre: readonly number[];
    mu: number;
    /** zJ of the bulk (energy) */
    coordinationHopping: number;
    temperature: number;
  };
  /** density on an open face above this flags the axis (default 1e-3 atoms per site) */
  edgeDensityMax?: number;
  /** fewer atoms than this make the cloud empty (default 1e-6) */
  emptyAtomsMax?: number;
}

const AXIS = ['x', 'y', 'z'];

/** Three significant digits without an exponent for ordinary sizes (2990, 1.02, 0.00174). */
export function threeDigits(x: number): string {
  return String(Number(x.toPrecision(3)));
}

/** A fraction of the atom number, or null when the cloud is empty (see `empty-cloud`). */
export function fractionOfAtoms(part: number, atoms: number, emptyAtomsMax = 1e-6): number | null {
  return atoms >= emptyAtomsMax && Number.isFinite(part) ? part / atoms : null;
}

export function readingWarnings(input: ReadingWarningInput): ReadingWarning[] {
  const warnings: ReadingWarning[] = [];
  const edgeMax = input.edgeDensityMax ?? 1e-3;
  const emptyMax = input.emptyAtomsMax ?? 1e-6;
  const { shape, density } = input;
  const count = shape.reduce((a, b) => a * b, 1);
  if (density.length !== count) throw new RangeError(`readingWarnings density: expected ${count} sites for shape ${JSON.stringify(shape)}, got ${density.length}`);

  const c = input.convergence;
  if (!c.converged) {
    const why: string[] = [];
    if (c.stopped) why.push('the run was stopped before convergence');
    if (c.residual > c.tolerance) why.push(`max |delta phi| = ${c.residual.toExponential(2)} after ${c.sweeps} sweeps, tolerance ${c.tolerance}`);
    if (c.muSearchConverged === false) why.push('the chemical potential for the atom number did not converge');
    if (c.temperatureSearchConverged === false) why.push('the temperature for the entropy per atom did not converge');
    if (why.length === 0) why.push('a convergence criterion was not met');
    warnings.push({
      code: 'not-converged',
      message: `not converged: ${why.join('; ')}; every reading below is provisional (raise solver.maxSweeps or loosen solver.tolerance)`,
    });
  }

  const t = input.truncation;
  if (t.maxTopWeight > t.topWeightMax) {
    warnings.push({
      code: 'truncation',
      message: `weight ${t.maxTopWeight.toExponential(2)} on the highest kept occupation |nmax = ${t.nmax}> (allowed ${t.topWeightMax}): densities and fluctuations are cut off; raise truncation.nmax`,
    });
  }

  if (!(input.atoms >= emptyMax)) {
    warnings.push({
      code: 'empty-cloud',
      message: `the lattice holds ${input.atoms.toExponential(2)} atoms (fewer than ${emptyMax}): there is no cloud, so fractions (condensate fraction, atom fractions, visibility) are undefined and given as null; raise the chemical potential or give particles.atoms`,
    });
    return warnings;
  }

  const edge = cloudAtEdge(input, edgeMax);
  if (edge !== null) warnings.push(edge);
  return warnings;
}

function cloudAtEdge(input: ReadingWarningInput, edgeMax: number): ReadingWarning | null {
  const { shape, density, periodic, trap } = input;
  const dims = shape.length;
  const strides = shape.map((_, d) => shape.slice(d + 1).reduce((a, b) => a * b, 1));
  const faces: string[] = [];
  const suggested = [...shape];
  let flagged = false;
  let estimated = true;
  for (let d = 0; d < dims; d++) {
    if (periodic[d] || shape[d] < 2) continue;
    if (trap !== undefined && !(trap.coefficient[d] > 0)) continue; // an untrapped axis: the faces are walls
    let peak = 0;
    let atoms = 0;
    for (let i = 0; i < density.length; i++) {
      const x = Math.floor(i / strides[d]) % shape[d];
      if (x !== 0 && x !== shape[d] - 1) continue;
      atoms += density[i];
      if (density[i] > peak) peak = density[i];
    }
    if (!(peak > edgeMax)) continue;
    flagged = true;
    faces.push(`${AXIS[d]} faces: density up to ${threeDigits(peak)}, ${threeDigits(atoms)} atoms`);
    const needed = trap !== undefined ? lengthHoldingCloud(trap, d) : null;
    if (needed !== null && needed > shape[d]) suggested[d] = needed;
    else estimated = false;
  }
  if (!flagged) return null;
  const size = estimated
    ? `a lattice of about [${suggested.join(', ')}] sites (trap centred) would hold it`
    : `enlarge lattice.shape along the flagged axes (the trap and mu give no estimate${suggested.some((n, d) => n !== shape[d]) ? `; at least [${suggested.join(', ')}]` : ''})`;
  return {
    code: 'cloud-at-edge',
    message: `the cloud reaches the open lattice edge (${faces.join('; ')}; above ${edgeMax} atoms per site): profiles, atom numbers and shell radii near the edge are cut off; ${size}, or lower the atom number or tighten the trap`,
  };
}

/** Even lattice length along axis d that holds the cloud of the trap and mu, with 2 sites of margin. */
function lengthHoldingCloud(trap: NonNullable<ReadingWarningInput['trap']>, d: number): number | null {
  const k = trap.coefficient[d];
  const muEdge = -trap.coordinationHopping + (trap.temperature > 0 ? trap.temperature * Math.log(1e-3) : 0);
  const reach = trap.mu - muEdge;
  if (!(k > 0) || !(reach > 0)) return null;
  const radius = Math.sqrt(reach / k);
  const length = 2 * Math.ceil(radius) + 4;
  return length % 2 === 0 ? length : length + 1;
}

/** The parts of a finished solve that the warnings read (structural: a RunOutcome fits). */
export interface SolvedCloud {
  model: { geometry: { shape: readonly number[]; periodic: readonly boolean[] }; hopping: ReadonlyArray<number | Float64Array>; nmax: number };
  solve: {
    mu: number;
    totals: { atoms: number };
    relax: { residual: number };
    muSearch: { converged: boolean };
  };
  temperature: number;
  temperatureSearch: { converged: boolean } | null;
  truncation: { maxTopWeight: number; nmaxUsed: number };
  converged: boolean;
  stopped: boolean;
  totalSweeps: number;
}

/**
 * Warnings of a finished solve: `outcome` is the solver's RunOutcome, `density` the site
 * density, `settings` the scenario's tolerances, `trap` the resolved trap (coefficient per
 * axis in the model's energy unit per site^2, centre in sites) and `fixedAtoms` whether mu
 * was searched for.
 */
export function readingWarningsOfSolve(
  outcome: SolvedCloud,
  density: Float64Array,
  settings: { tolerance: number; topWeightMax: number; fixedAtoms: boolean },
  trap: { coefficient: readonly number[]; centre: readonly number[] },
): ReadingWarning[] {
  const { geometry, hopping } = outcome.model;
  let zJ = 0;
  geometry.shape.forEach((n, d) => {
    if (n < 2) return;
    const h = hopping[d];
    let j = 0;
    if (typeof h === 'number') j = h;
    else for (let i = 0; i < h.length; i++) j = Math.max(j, h[i]);
    zJ += 2 * j;
  });
  return readingWarnings({
    shape: geometry.shape,
    periodic: geometry.periodic,
    density,
    atoms: outcome.solve.totals.atoms,
    convergence: {
      converged: outcome.converged,
      stopped: outcome.stopped,
      residual: outcome.solve.relax.residual,
      tolerance: settings.tolerance,
      sweeps: outcome.totalSweeps,
      muSearchConverged: settings.fixedAtoms ? outcome.solve.muSearch.converged : null,
      temperatureSearchConverged: outcome.temperatureSearch === null ? null : outcome.temperatureSearch.converged,
    },
    truncation: { nmax: outcome.truncation.nmaxUsed, maxTopWeight: outcome.truncation.maxTopWeight, topWeightMax: settings.topWeightMax },
    trap: { coefficient: trap.coefficient, centre: trap.centre, mu: outcome.solve.mu, coordinationHopping: zJ, temperature: outcome.temperature },
  });
}
