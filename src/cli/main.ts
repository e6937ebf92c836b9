// The command-line entry point: builds the commander program from one module per command
// (src/cli/commands) and maps every outcome to an exit code (DESIGN.md section 6):
// 0 done; 2 bad input (an InputError, thrown only by validation and documented input
// checks: its message names the field or option and what to change); 3 not converged
// (results written and flagged); 130 interrupted; 1 anything else, an internal error,
// reported in one line (the stack with --debug or TIERCAKE_DEBUG=1).

import { Command, CommanderError } from 'commander';
import { ExitCode, InputError } from '../scenario/inputError.js';
import { printable } from '../scenario/formatScenarioError.js';
import { toolVersion } from '../output/toolVersion.js';
import { commandPrefix } from './invocation.js';
import { parseKernelChoice, setDefaultKernelChoice } from '../solver/kernel/sweepKernels.js';
import { registerSolve } from './commands/solve.js';
import { registerCheck } from './commands/check.js';
import { registerDiagram } from './commands/diagram.js';
import { registerHubbard } from './commands/hubbard.js';
import { registerCompare } from './commands/compare.js';
import { registerKeys } from './commands/keys.js';
import { registerEnsemble } from './commands/ensemble.js';
import { registerMerge } from './commands/merge.js';
import { registerEvolve } from './commands/evolve.js';
import { registerScan } from './commands/scan.js';
import { registerSubmit } from './commands/submit.js';
import { registerProgress } from './commands/progress.js';

/** Every command, in the order `--help` lists them. */
const COMMANDS = [registerSolve, registerCheck, registerDiagram, registerHubbard, registerCompare, registerKeys, registerEnsemble, registerMerge, registerEvolve, registerScan, registerSubmit, registerProgress];

/** Commands set this when they finish with a non-zero status without throwing. */
export interface CommandContext {
  exitCode: number;
}

export function buildProgram(context: CommandContext): Command {
  const program = new Command();
  program
    // The usage lines name a command that works as typed (invocation.ts): `tiercake` when it
    // is on PATH, else e.g. `node dist/main.js`.
    .name(commandPrefix())
    .description('Site-resolved Gutzwiller predictions for bosons in trapped, disordered optical lattices')
    .version(toolVersion(), '-V, --version')
    .option('--debug', 'on an internal error, print the stack trace (also: TIERCAKE_DEBUG=1)')
    .showHelpAfterError('(run with --help for usage)')
    .exitOverride();
  for (const register of COMMANDS) register(program, context);
  return program;
}

/** An input error as printed: control characters escaped, each line capped. */
export function inputErrorText(err: InputError): string {
  const lines = err.message.split('\n').map((line) => {
    const safe = printable(line);
    return safe.length > 400 ? `${safe.slice(0, 397)}...` : safe;
  });
  return `tiercake: ${lines.join('\n')}\n`;
}

/** An internal error as printed: one line, and the stack when asked for. */
export function internalErrorText(err: unknown, debug: boolean): string {
  const message = printable((err instanceof Error ? err.message : String(err)).split('\n')[0]).slice(0, 400);
  const stack = debug && err instanceof Error && err.stack ? `${err.stack}\n` : '';
  return `tiercake: internal error: ${message}\n  this is a bug in tiercake, not in your input${debug ? '' : '; run again with --debug for the details'}\n${stack}`;
}

function debugRequested(argv: readonly string[], program?: Command): boolean {
  const env = process.env.TIERCAKE_DEBUG;
  return (env !== undefined && env !== '' && env !== '0') || argv.includes('--debug') || program?.opts().debug === true;
}

export async function runCli(argv: string[]): Promise<number> {
  const context: CommandContext = { exitCode: ExitCode.done };
  const program = buildProgram(context);
  try {
    await program.parseAsync(argv, { from: 'user' });
    return context.exitCode;
  } catch (err) {
    if (err instanceof CommanderError) {
      if (err.code === 'commander.helpDisplayed' || err.code === 'commander.version' || err.code === 'commander.help') return ExitCode.done;
      return ExitCode.badInput; // commander already printed the message
    }
    if (err instanceof InputError) {
      process.stderr.write(inputErrorText(err));
      return ExitCode.badInput;
    }
    process.stderr.write(internalErrorText(err, debugRequested(argv, program)));
    return ExitCode.failure;
  }
}

export function main(): void {
  // TIERCAKE_KERNEL=js forces the JavaScript reference kernel (CI runs both paths).
  const kernel = process.env.TIERCAKE_KERNEL;
  if (kernel !== undefined && kernel !== '') {
    try {
      setDefaultKernelChoice(parseKernelChoice(kernel, 'TIERCAKE_KERNEL'));
    } catch (err) {
      process.stderr.write(`tiercake: ${err instanceof Error ? err.message : String(err)}\n`);
      process.exitCode = ExitCode.badInput;
      return;
    }
  }
  const argv = process.argv.slice(2);
  runCli(argv).then(
    (code) => {
      process.exitCode = code;
    },
    (err) => {
      process.stderr.write(internalErrorText(err, debugRequested(argv)));
      process.exitCode = ExitCode.failure;
    },
  );
}
