// The lines `tiercake evolve` prints on stdout when an evolution has been written: status,
// steps, time and threads; atoms, condensed atoms and visibility from the first to the last
// row; the adiabaticity verdict; quenches; the spectrum; the output folder. Pure text.

import type { EvolveArtifacts } from '../pipeline/evolveScenario.js';

export function evolveSummaryLines(a: EvolveArtifacts, outDir: string): string[] {
  const s = a.series;
  const last = s.time.length - 1;
  const v = a.verdict;
  return [
    `${a.prepared.scenario.name}: evolution ${a.status === 'done' ? 'done' : 'FAILED'} to t = ${a.result.time} ${a.plan.timeUnit}: ${a.result.statistics.steps} steps, ${a.result.statistics.rejectedSteps} rejected (${a.timings.evolveSeconds.toFixed(2)} s, ${a.threadsUsed} thread${a.threadsUsed > 1 ? 's' : ''})`,
    `  atoms ${s.atoms[0].toPrecision(8)} -> ${s.atoms[last].toPrecision(8)}, condensed ${s.condensedAtoms[0].toPrecision(5)} -> ${s.condensedAtoms[last].toPrecision(5)}, visibility ${s.visibility[0].toFixed(3)} -> ${s.visibility[last].toFixed(3)}`,
    v
      ? `  verdict: ${v.adiabaticOverall ? 'adiabatic' : 'NOT adiabatic'}; excess energy ${v.excessEnergyPerAtomInScale.toPrecision(3)} U per atom (threshold ${v.excessEnergyThresholdU} U); ` +
        `excess defects per shell site ${v.shells.map((sh) => `n=${sh.filling}: ${sh.excessDefectsPerSite.toPrecision(3)}`).join(', ') || 'no shells'}`
      : '  verdict: none (the evolution did not reach its end)',
    ...(a.plan.quenches.length > 0 ? [`  quench at t = 0: ${a.plan.quenches.map((q) => q.path).join(', ')}`] : []),
    ...(a.spectrum ? [`  modulation spectrum: ${a.spectrum.points.length} frequencies in spectrum.csv`] : []),
    `  results in ${outDir}`,
  ];
}
