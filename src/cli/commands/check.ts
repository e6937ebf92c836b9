// `tiercake check SCENARIO`: validate a scenario and print the resolved parameters,
// without solving or writing anything.

import type { Command } from 'commander';
import type { CommandContext } from '../main.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { inAllUnits } from '../../scenario/resolveScenario.js';
import { ExitCode } from '../../scenario/inputError.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { memoryLimitBytes } from '../machine.js';

const OPTIONS = ['set'] as const;

export function registerCheck(program: Command, context: CommandContext): void {
  const command = program
    .command('check')
    .description('validate a scenario and print the resolved parameters (nothing is solved or written)')
    .argument('<scenario>', 'scenario file (JSON)');
  declare(command, OPTIONS).action((scenarioPath: string, options: RawOptions) => {
    context.exitCode = runCheck(scenarioPath, options);
  });
}

export function runCheck(scenarioPath: string, raw: RawOptions): number {
  const o = readOptions(raw, OPTIONS);
  const { resolved } = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes: memoryLimitBytes() });
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
  for (const w of resolved.laboratory?.warnings ?? []) lines.push(`  warning: ${w}`);
  process.stdout.write(`${lines.join('\n')}\n`);
  return ExitCode.done;
}
