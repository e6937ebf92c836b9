// The lines `tiercake check` prints: the resolved parameters of a valid scenario (mode,
// lattice, J, U, trap, chemical potential or atoms, temperature or entropy, truncation, the
// landscape terms), every energy in all its units, then the --set notes and the warnings
// known before solving. Pure text.

import { inAllUnits, type ResolvedScenario } from '../scenario/resolveScenario.js';
import type { RunWarning } from '../pipeline/runWarnings.js';

export function checkSummaryLines(resolved: ResolvedScenario, overrideNotes: readonly string[], warnings: readonly RunWarning[]): string[] {
  const u = resolved.units;
  const show = (label: string, v: number): string => {
    const all = inAllUnits(v, u);
    return `  ${label.padEnd(22)} ${Object.entries(all).map(([k, x]) => `${x.toPrecision(6)} ${k}`).join('   ')}`;
  };
  const lines = [
    `scenario ${resolved.scenario.name}: valid`,
    `  mode                   ${resolved.mode}`,
    `  lattice                ${resolved.geometry.shape.join(' x ')} sites (${resolved.geometry.siteCount}), ${resolved.geometry.periodic.map((p) => (p ? 'periodic' : 'open')).join('/')}`,
    ...(resolved.latticeSpacingUm !== null ? [`  lattice spacing        ${resolved.latticeSpacingUm.toPrecision(6)} µm`] : []),
    show('hopping J', u.hopping),
    show('interaction U', u.interaction),
    `  U/J                    ${(u.interaction / u.hopping).toPrecision(6)}`,
    ...resolved.trapCoefficient.map((k, d) => show(`trap coeff. ${'xyz'[d]} /site²`, k)),
    resolved.chemical.kind === 'mu' ? show('chemical potential', resolved.chemical.mu) : `  atoms                  ${resolved.chemical.atoms}`,
    resolved.thermal.kind === 'temperature' ? show('k_B T', resolved.thermal.kT) : `  entropy per atom       ${resolved.thermal.entropyPerAtom} k_B`,
    `  nmax                   ${resolved.scenario.truncation.nmax}${resolved.scenario.truncation.automatic ? ' (raised automatically if needed)' : ''}`,
  ];
  const terms = resolved.landscape.records;
  if (terms.length > 0) {
    lines.push(`  landscape              ${terms.length} term${terms.length > 1 ? 's' : ''}`);
    for (const t of terms) {
      const range = `${t.minimum.toPrecision(4)} .. ${t.maximum.toPrecision(4)} ${t.energyUnit}`;
      const file = t.file !== null ? `; file ${t.file.path} (sha256 ${t.file.sha256.slice(0, 12)}...)` : '';
      lines.push(`    [${t.index}] ${t.name} (${t.kind}): ${range}${file}`);
      lines.push(`        ${t.method}`);
    }
  } else {
    lines.push('  landscape              none');
  }
  for (const note of overrideNotes) lines.push(`  note: ${note}`);
  for (const w of warnings) lines.push(`  warning: ${w.code}: ${w.message}`);
  return lines;
}
