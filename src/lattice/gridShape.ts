// The shape of a lattice field: 1 to 3 axes of positive integer length, first axis slowest
// (C order, as in latticeGeometry.ts). One check for every module that takes a flat field
// and its shape, so that they word the error alike.

/**
 * Checks `shape` and returns its sizes padded with trailing 1s to three axes:
 * [nx] -> [nx, 1, 1], [nx, ny] -> [nx, ny, 1]. `context` starts the error message.
 */
export function gridSizes(shape: readonly number[], context: string): [number, number, number] {
  if (!Array.isArray(shape) || shape.length < 1 || shape.length > 3) {
    throw new RangeError(`${context} shape: expected [nx], [nx, ny] or [nx, ny, nz], got ${JSON.stringify(shape)}`);
  }
  shape.forEach((n, axis) => {
    if (!Number.isInteger(n) || n < 1) {
      throw new RangeError(`${context} shape[${axis}]: expected an integer >= 1, got ${n}`);
    }
  });
  return [shape[0], shape[1] ?? 1, shape[2] ?? 1];
}
