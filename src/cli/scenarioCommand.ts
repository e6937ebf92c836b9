// The declaration shared by every command that takes one scenario file (solve, check,
// compare, ensemble, evolve, scan, submit): its name and description, the `<scenario>`
// argument, the options it picks from the one table (options.ts), and the function that
// runs it; the exit code that function returns becomes the process's.

import type { Command } from 'commander';
import type { CommandContext } from './main.js';
import { declare, type DeclareOverrides, type OptionName, type RawOptions } from './options.js';

export interface ScenarioCommand {
  name: string;
  description: string;
  /** help text of the `<scenario>` argument */
  scenarioHelp: string;
  options: readonly OptionName[];
  /** help texts or defaults of this command that differ from the table's */
  overrides?: Partial<Record<OptionName, DeclareOverrides>>;
  run: (scenarioPath: string, raw: RawOptions) => Promise<number> | number;
}

export function registerScenarioCommand(program: Command, context: CommandContext, spec: ScenarioCommand): void {
  const command = program.command(spec.name).description(spec.description).argument('<scenario>', spec.scenarioHelp);
  declare(command, spec.options, spec.overrides).action(async (scenarioPath: string, options: RawOptions) => {
    context.exitCode = await spec.run(scenarioPath, options);
  });
}
