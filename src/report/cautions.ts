// The standard cautions printed in every report: what site-decoupled mean-field theory
// gets wrong, and what the user must check in the laboratory. Plain, short sentences for
// a reader standing between two experimental runs. Published values are cited inline:
//   Capogrosso-Sansone, Prokof'ev, Svistunov, PRB 75, 134302 (2007)  (3D, (U/J)c = 29.34)
//   Capogrosso-Sansone, Soyler, Prokof'ev, Svistunov, PRA 77, 015602 (2008)  (2D, 16.74)
//   mean-field tip of the n = 1 lobe: U/(zJ) = 5.828 (= 3 + 2 sqrt 2), e.g. van Oosten,
//   van der Straten, Stoof, PRA 63, 053601 (2001); z = 6 in 3D, 4 in 2D.
//   Gerbier, PRL 99, 120405 (2007)  (Mott shells at finite temperature)

import type { CautionItem } from './reportModel.js';

export const MEAN_FIELD_CAUTION: CautionItem = {
  title: 'Mean-field theory shrinks the Mott insulator',
  text:
    'These results come from Gutzwiller mean-field theory, which puts the superfluid to Mott insulator ' +
    'transition at too large an interaction, so its Mott regions are too small. For filling n = 1 in 3D, ' +
    "quantum Monte Carlo gives (U/J)c = 29.34 (Capogrosso-Sansone, Prokof'ev, Svistunov, PRB 75, 134302 " +
    '(2007)); mean-field theory gives 34.97 (= 6 \u00D7 5.828). In 2D the values are 16.74 ' +
    '(Capogrosso-Sansone et al., PRA 77, 015602 (2008)) and 23.31. The theory leaves out quantum ' +
    'fluctuations, which matter most near the transition and in low dimensions (1D especially, where it ' +
    'is only a rough guide). So Mott shells come out too narrow and the superfluid rings between them ' +
    'too wide, and shell radii near the transition are approximate.',
};

export const LASER_SAFETY_CAUTION: CautionItem = {
  title: 'Laser safety and depth calibration',
  text:
    'Lattice depths here were converted from beam power. Lattice lasers are high-power lasers: ' +
    "follow your local laser-safety rules and the instructions of your lab's laser-safety officer; " +
    'nothing in this report is safety advice. The converted depth is an estimate that assumes ideal ' +
    "beams (waist, overlap, polarisation, losses); check it against the lab's own depth calibration " +
    'before relying on it.',
};

export const LOCAL_DENSITY_CAUTION: CautionItem = {
  title: 'Local-density reading',
  text:
    'Plots against the local chemical potential treat each site as a small uniform system at ' +
    '\u03BC \u2212 \u03B5(site). That picture fails where the potential changes over a few sites ' +
    '(steep traps, fine speckle grains) and right at shell edges.',
};

export const FINITE_TEMPERATURE_CAUTION: CautionItem = {
  title: 'Temperature',
  text:
    'A temperature or entropy per atom is an input, and it assumes the cloud reached equilibrium in ' +
    'the lattice; real loading is rarely fully adiabatic. Mean-field theory treats heat site by site ' +
    'and misses long-wavelength phase fluctuations, so it overstates how long superfluid regions ' +
    'survive as the temperature rises. Mott shells melt gradually as the temperature grows towards a ' +
    'fraction of U (Gerbier, PRL 99, 120405 (2007)).',
};

export interface CautionContext {
  /** Some lattice depth was computed from beam power rather than given in recoil energies. */
  depthFromBeamPower: boolean;
  /** The solution is at T > 0 (given as temperature or as entropy per atom). */
  finiteTemperature: boolean;
  /** The report shows density against local chemical potential. */
  showsLocalDensityPlots: boolean;
}

/** The cautions that apply to one result, most important first. */
export function cautionsFor(context: CautionContext): CautionItem[] {
  const items: CautionItem[] = [MEAN_FIELD_CAUTION];
  if (context.depthFromBeamPower) items.push(LASER_SAFETY_CAUTION);
  if (context.finiteTemperature) items.push(FINITE_TEMPERATURE_CAUTION);
  if (context.showsLocalDensityPlots) items.push(LOCAL_DENSITY_CAUTION);
  return items;
}
