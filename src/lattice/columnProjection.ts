// How a camera looking along one lattice axis sees a 3D field stored in C order: the two
// axes left in the picture ("kept", in lattice order) and the flat-index strides that walk
// them and the layers along the line of sight. The time-of-flight models
// (imaging/freeExpansion.ts, observables/momentumStructureFactor.ts), the bond coherences
// (imaging/particleHoleCoherence.ts) and the camera set-up (imaging/cameraOptics.ts) must
// agree on this, or a picture would come out transposed against the others.

/** Axes of the picture and strides of a projection along one lattice axis. */
export interface ColumnProjection {
  /** The two lattice axes that remain in the picture, in lattice order: u = kept[0], v = kept[1]. */
  kept: [number, number];
  /** Sites along u and v. */
  lu: number;
  lv: number;
  /** Flat-index steps along u, along v and from one layer to the next along the line of sight. */
  su: number;
  sv: number;
  sl: number;
  /** Sites along the line of sight. */
  layers: number;
}

/** The two lattice axes a camera looking along `axis` keeps, in lattice order. */
export function keptAxes(axis: 0 | 1 | 2): [number, number] {
  return axis === 0 ? [1, 2] : axis === 1 ? [0, 2] : [0, 1];
}

/** Projection of a field of sizes n (padded to three axes, first axis slowest) along `axis`. */
export function columnProjection(n: readonly [number, number, number], axis: 0 | 1 | 2): ColumnProjection {
  const kept = keptAxes(axis);
  const strides = [n[1] * n[2], n[2], 1];
  return {
    kept,
    lu: n[kept[0]],
    lv: n[kept[1]],
    su: strides[kept[0]],
    sv: strides[kept[1]],
    sl: strides[axis],
    layers: n[axis],
  };
}
