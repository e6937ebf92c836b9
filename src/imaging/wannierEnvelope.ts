// Momentum envelope |w~(k)|^2 of the far-field pattern: the Fourier transform of the
// Wannier function squared, which multiplies the lattice interference pattern.
//
// Gaussian approximation: in a deep lattice each well is nearly harmonic and the
// Wannier function is close to the oscillator ground state
// w(x) = (pi l^2)^(-1/4) exp(-x^2 / (2 l^2)), whose transform gives
// |w~(k)|^2 = 2 sqrt(pi) l exp(-k^2 l^2), normalised so that
// integral |w~(k)|^2 dk / (2 pi) = integral |w(x)|^2 dx = 1 (Parseval).
// For a lattice of depth s recoil energies, hbar omega = 2 sqrt(s) E_r and
// l / a = 1 / (pi s^(1/4)) (harmonic approximation of the well; e.g. Zwerger, J. Opt. B 5,
// S9 (2003)); the true Wannier function has small side lobes that this ignores.
// The pictures use the true envelope of the band-structure Wannier functions
// (orbitalEnvelope, from siteOrbital.ts): with the Gaussian of matched width the visibility of
// a 16 E_r layer comes out 3.7 % low, because the true envelope is 4 % higher along the axes
// than along the diagonals. The Gaussian stays for tests and quick estimates.
// Any envelope is a MomentumEnvelope with the normalisation, in two dimensions,
// integral |w~(k)|^2 d^2k / (2 pi)^2 = 1, k in 1/um, |w~|^2 in um^2.
//
// Dimensionless mode (no mass, no lattice depth in recoil energies) has no Wannier function:
// there is no time-of-flight picture, and the visibility is that of the lattice structure
// factor alone (structureFactorOnlyEnvelope, envelope = 1), the value an isotropic envelope
// would give; a real lattice's envelope anisotropy (a few per cent) is then not included.

export interface MomentumEnvelope {
  /** |w~(k)|^2 at (kx, ky) in 1/um, normalised as in the file header, um^2. */
  at(kxPerUm: number, kyPerUm: number): number;
  /** When the envelope is a product f(kx) g(ky), the factors (in um each): lets image code precompute them. */
  factors?: { x(kPerUm: number): number; y(kPerUm: number): number };
}

/** Oscillator length over lattice spacing, l / a = 1 / (pi s^(1/4)), for depth s in E_r (harmonic approximation). */
export function harmonicWannierWidthSites(depthEr: number): number {
  if (!(depthEr > 0) || !Number.isFinite(depthEr)) {
    throw new Error(`harmonicWannierWidthSites: lattice depth must be a positive number of recoil energies, got ${depthEr}`);
  }
  return 1 / (Math.PI * Math.pow(depthEr, 0.25));
}

/**
 * Gaussian envelope 2 sqrt(pi) l exp(-k^2 l^2) per axis, with l = widthSites * a along
 * each image axis. widthSites: one number for both axes, or one per image axis (e.g. a
 * tight transverse trap along a kept axis of length 1).
 */
export function gaussianWannierEnvelope(
  widthSites: number | readonly [number, number],
  latticeSpacingUm: number,
): MomentumEnvelope {
  const [wx, wy] = typeof widthSites === 'number' ? [widthSites, widthSites] : widthSites;
  for (const w of [wx, wy]) {
    if (!(w > 0) || !Number.isFinite(w)) {
      throw new Error(`gaussianWannierEnvelope: Wannier width must be a positive number of sites, got ${w}`);
    }
  }
  if (!(latticeSpacingUm > 0) || !Number.isFinite(latticeSpacingUm)) {
    throw new Error(`gaussianWannierEnvelope: lattice spacing must be a positive number of micrometres, got ${latticeSpacingUm}`);
  }
  const lx = wx * latticeSpacingUm;
  const ly = wy * latticeSpacingUm;
  const ax = 2 * Math.sqrt(Math.PI) * lx;
  const ay = 2 * Math.sqrt(Math.PI) * ly;
  const lx2 = lx * lx;
  const ly2 = ly * ly;
  const x = (k: number) => ax * Math.exp(-k * k * lx2);
  const y = (k: number) => ay * Math.exp(-k * k * ly2);
  return { at: (kx, ky) => x(kx) * y(ky), factors: { x, y } };
}

/** The minimal view of a site orbital an envelope needs (siteOrbital.ts). */
export interface OrbitalMomentumDensity {
  /** |w~(k)|^2 in um, normalised as int |w~|^2 dk / (2 pi) = 1. */
  momentumDensity(kPerUm: number): number;
}

/**
 * The true envelope |w~_x(k_x)|^2 |w~_y(k_y)|^2 of the band-structure Wannier functions (or
 * of harmonic-oscillator ground states along trapped axes), from the orbitals of the two
 * image axes (siteOrbital.ts). Unlike the Gaussian of matched width it is not isotropic: a
 * lattice Wannier function has more weight along the axes than along the diagonals at the
 * same |k| (4 % at 16 E_r at |k| = 2 pi / a), which the visibility then measures too.
 */
export function orbitalEnvelope(orbitals: readonly [OrbitalMomentumDensity, OrbitalMomentumDensity]): MomentumEnvelope {
  const [ox, oy] = orbitals;
  const x = (k: number) => ox.momentumDensity(k);
  const y = (k: number) => oy.momentumDensity(k);
  return { at: (kx, ky) => x(kx) * y(ky), factors: { x, y } };
}

/** Envelope 1: the visibility of the lattice structure factor alone (dimensionless mode, no Wannier function known). */
export const structureFactorOnlyEnvelope: MomentumEnvelope = { at: () => 1, factors: { x: () => 1, y: () => 1 } };

/** How to describe structureFactorOnlyEnvelope in a summary. */
export const structureFactorOnlyNote =
  'none: no Wannier function is known (dimensionless mode), so the lattice structure factor alone is compared (envelope 1); ' +
  "a real lattice's envelope is a few per cent stronger along the axes than along the diagonals, which this leaves out";
