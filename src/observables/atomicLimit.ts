// The atomic limit (J = 0) of the Bose-Hubbard site at temperature kT: the thermal
// reference against which the T > 0 phase labels measure a site's number fluctuations.
//
// At J = 0 the site Hamiltonian is diagonal, E_n = U n(n-1)/2 - mu n, so the grand-canonical
// weights are p_n = exp(-E_n/kT)/Z and every observable is a finite sum (n = 0..nmax). The
// fluctuation-dissipation relation of a grand-canonical site gives the compressibility
// dn/dmu = (<n^2> - <n>^2)/kT. At the centre of the plateau of filling k, mu = U (k - 1/2),
// the neighbouring fillings k - 1 and k + 1 both cost U/2, so to leading order
//   <n^2> - <n>^2 = 2 e^{-U/2kT} / (1 + 2 e^{-U/2kT}),
// the thermal particle-hole defects of a Mott shell (Gerbier, PRL 99, 120405 (2007)).

export interface AtomicSite {
  density: number;
  numberVariance: number;
  parityOdd: number;
  /** dn/dmu = variance/kT (1/energy unit); 0 at T = 0 away from a degeneracy */
  compressibility: number;
}

/**
 * Thermal state of one site at J = 0 (energies in one unit: U, mu, kT). At kT = 0 the
 * ground filling (the lowest level; at an exact degeneracy the two levels share the weight).
 */
export function atomicLimitSite(
  interactionU: number,
  mu: number,
  temperature: number,
  nmax: number,
  /** optional result object to fill (no allocation in loops over sites) */
  out?: AtomicSite,
): AtomicSite {
  if (!(interactionU > 0) || !Number.isFinite(interactionU)) throw new RangeError(`atomicLimitSite interactionU: expected > 0, got ${interactionU}`);
  if (!Number.isFinite(mu)) throw new RangeError(`atomicLimitSite mu: expected a finite number, got ${mu}`);
  if (!(temperature >= 0) || !Number.isFinite(temperature)) throw new RangeError(`atomicLimitSite temperature: expected >= 0, got ${temperature}`);
  if (!Number.isInteger(nmax) || nmax < 1) throw new RangeError(`atomicLimitSite nmax: expected an integer >= 1, got ${nmax}`);
  let eMin = Infinity;
  for (let n = 0; n <= nmax; n++) eMin = Math.min(eMin, 0.5 * interactionU * n * (n - 1) - mu * n);
  let z = 0;
  let s1 = 0;
  let s2 = 0;
  let odd = 0;
  for (let n = 0; n <= nmax; n++) {
    const e = 0.5 * interactionU * n * (n - 1) - mu * n - eMin;
    const w = temperature > 0 ? Math.exp(-e / temperature) : e === 0 ? 1 : 0;
    z += w;
    s1 += n * w;
    s2 += n * n * w;
    if (n % 2 === 1) odd += w;
  }
  const density = s1 / z;
  const variance = Math.max(0, s2 / z - density * density);
  const result = out ?? { density: 0, numberVariance: 0, parityOdd: 0, compressibility: 0 };
  result.density = density;
  result.numberVariance = variance;
  result.parityOdd = odd / z;
  result.compressibility = temperature > 0 ? variance / temperature : 0;
  return result;
}

/** The atomic-limit site at the centre of the plateau of filling k >= 1, mu = U (k - 1/2). */
export function plateauCentre(filling: number, interactionU: number, temperature: number, nmax: number): AtomicSite {
  if (!Number.isInteger(filling) || filling < 1) throw new RangeError(`plateauCentre filling: expected an integer >= 1, got ${filling}`);
  return atomicLimitSite(interactionU, interactionU * (filling - 0.5), temperature, Math.max(nmax, filling + 2));
}
