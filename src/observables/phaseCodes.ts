// Integer codes of the local phase of a site (DESIGN.md section 1, "Phases, site by
// site"). Stored in Uint8Array maps and written to .npy files, so the numbers are part
// of the output interface: keep them stable.

export const PhaseCode = {
  empty: 0,
  superfluid: 1,
  mott: 2,
  boseGlass: 3,
  normalFluid: 4,
} as const;

export type PhaseName = keyof typeof PhaseCode;
export type PhaseCodeValue = (typeof PhaseCode)[PhaseName];

/** Phase names in code order (index = code). */
export const phaseNames: readonly PhaseName[] = ['empty', 'superfluid', 'mott', 'boseGlass', 'normalFluid'];

/** Names of the phases for tables and legends. */
export const phaseTitles: Record<PhaseName, string> = {
  empty: 'empty',
  superfluid: 'superfluid',
  mott: 'Mott insulator',
  boseGlass: 'Bose glass',
  normalFluid: 'normal fluid',
};
