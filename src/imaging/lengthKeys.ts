// Lengths in metadata that cannot be read two ways (issue "units that cannot be misread"):
// a length is written under a neutral key (`pixelSize`, `firstPixelCentre`, ...) beside
// `lengthUnit`, "um" (micrometres, laboratory mode), "lattice-momentum" (momentum pictures
// in units of 2 hbar k_L) or "sites" (lattice spacings,
// dimensionless mode, where no lattice spacing is known). Only when the length really is in
// micrometres is it also written under the old `...Um` key, so readers of earlier files keep
// working and a key ending in Um always holds micrometres.

import type { LengthUnit } from './pixelPicture.js';

/** `{ [key]: value, [umKey]: value }` in micrometres, `{ [key]: value }` in lattice spacings. */
export function lengthEntry<T>(key: string, umKey: string, value: T, unit: LengthUnit): Record<string, T> {
  return unit.code === 'um' ? { [key]: value, [umKey]: value } : { [key]: value };
}

/** The unit entries that go with neutral length keys. */
export function lengthUnitEntries(unit: LengthUnit): { lengthUnit: LengthUnit['code']; lengthUnitNote: string } {
  return { lengthUnit: unit.code, lengthUnitNote: unit.note };
}
