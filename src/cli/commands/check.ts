// `tiercake check SCENARIO`: validate a scenario and print the resolved parameters,
// without solving or writing anything.

import type { Command } from 'commander';
import type { CommandContext } from '../main.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { checkSummaryLines } from '../../report/checkSummaryLines.js';
import { ExitCode } from '../../scenario/inputError.js';
import { readOptions, type RawOptions } from '../options.js';
import { registerScenarioCommand } from '../scenarioCommand.js';
import { memoryLimitBytes } from '../machine.js';
import { solveWarnings } from '../../pipeline/runWarnings.js';

const OPTIONS = ['set'] as const;

export function registerCheck(program: Command, context: CommandContext): void {
  registerScenarioCommand(program, context, {
    name: 'check',
    description: 'validate a scenario and print the resolved parameters (nothing is solved or written)',
    scenarioHelp: 'scenario file (JSON)',
    options: OPTIONS,
    run: runCheck,
  });
}

export function runCheck(scenarioPath: string, raw: RawOptions): number {
  const o = readOptions(raw, OPTIONS);
  const { resolved, overrideNotes } = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes: memoryLimitBytes() });
  // The warnings known before solving (the laboratory model, the landscape).
  const lines = checkSummaryLines(resolved, overrideNotes, solveWarnings({ readingWarnings: [], resolved }));
  process.stdout.write(`${lines.join('\n')}\n`);
  return ExitCode.done;
}
