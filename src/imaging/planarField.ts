// A two-dimensional field on a regular grid: the common currency of the camera model.
// Flat Float64Array in C order, first axis slowest: value(i, j) = values[i * ny + j].
// Axis 0 ("x", rows) and axis 1 ("y", columns) keep the order of the lattice axes they
// came from, so a field saved as .npy has shape (nx, ny) like the lattice fields.

export interface PlanarField {
  /** Values in C order, index i * ny + j. */
  values: Float64Array;
  /** Number of points along axis 0 (slowest). */
  nx: number;
  /** Number of points along axis 1 (fastest). */
  ny: number;
}

/** Sum of all values (the atom number of an image in atoms per pixel or per site). */
export function totalOf(field: PlanarField): number {
  const v = field.values;
  let sum = 0;
  for (let i = 0; i < v.length; i++) sum += v[i];
  return sum;
}

/** Checks that values.length === nx * ny; `what` names the argument in the message. */
export function assertPlanarField(field: PlanarField, what: string): void {
  if (!Number.isInteger(field.nx) || !Number.isInteger(field.ny) || field.nx < 1 || field.ny < 1) {
    throw new Error(`${what}: grid size must be positive integers, got ${field.nx} x ${field.ny}`);
  }
  if (field.values.length !== field.nx * field.ny) {
    throw new Error(
      `${what}: ${field.nx} x ${field.ny} grid needs ${field.nx * field.ny} values, got ${field.values.length}`,
    );
  }
}
