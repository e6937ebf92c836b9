// The characteristic density of a trapped lattice gas (Rigol, Batrouni, Rousseau and
// Scalettar, PRA 79, 053605 (2009)): with the trap written as eps_i = V r_i^2 (r in lattice
// spacings, V an energy per site^2, the convention of the scenario's trap.coefficient) and
// the hopping J, the trap's characteristic length is zeta = sqrt(J / V) sites and
//
//     rho~ = N (V / J)^(d/2) = N / zeta^d.
//
// In the local-density approximation the density at radius r is a function of
// (mu - V r^2)/J and U/J alone, so at fixed U/J every cloud with the same rho~ has the
// same central density and the same phases at the same r / zeta, whatever N and V are
// separately; the paper uses this to draw one state diagram for all atom numbers and trap
// curvatures (the form N (V/J)^(d/2) is recalled from memory; the stored copy of the paper
// available here gave its abstract only). For a trap with different curvatures V_d or
// hoppings J_d per axis this file uses the natural extension rho~ = N prod_d sqrt(V_d/J_d)
// (our own: one characteristic length per axis).

/** Characteristic length zeta_d = sqrt(J_d / V_d) per axis, in sites (Infinity on an untrapped axis). */
export function characteristicLengths(trapPerSite2: readonly number[], hopping: readonly number[]): number[] {
  return trapPerSite2.map((v, d) => Math.sqrt(hopping[d] / v));
}

/** rho~ = N prod_d sqrt(V_d / J_d); 0 when an axis is untrapped, NaN when a hopping is not positive. */
export function characteristicDensity(atoms: number, trapPerSite2: readonly number[], hopping: readonly number[]): number {
  let product = atoms;
  for (let d = 0; d < trapPerSite2.length; d++) {
    if (!(hopping[d] > 0)) return NaN;
    product *= Math.sqrt(trapPerSite2[d] / hopping[d]);
  }
  return product;
}

/** The atom number that gives rho~ in this trap: N = rho~ prod_d sqrt(J_d / V_d). */
export function atomsForCharacteristicDensity(rho: number, trapPerSite2: readonly number[], hopping: readonly number[]): number {
  return rho / characteristicDensity(1, trapPerSite2, hopping);
}

/**
 * The factor s that turns every trap curvature V_d into s V_d so that N atoms have the
 * characteristic density rho~: rho~ scales as s^(d/2), so s = (rho~ / rho~_now)^(2/d).
 */
export function trapScaleForCharacteristicDensity(rho: number, atoms: number, trapPerSite2: readonly number[], hopping: readonly number[]): number {
  const now = characteristicDensity(atoms, trapPerSite2, hopping);
  return (rho / now) ** (2 / trapPerSite2.length);
}
