// The option table (src/cli/options.ts): every option is declared once and read through
// one parser, so commander hands over text and the table turns it into numbers, flags and
// lists with the option named in every refusal. Also: every command of the program takes
// its options from the table (no option is declared outside it).

import { Command } from 'commander';
import { describe, expect, it } from 'vitest';
import { declare, OPTION_TABLE, readOptions } from '../../src/cli/options.js';
import { buildProgram } from '../../src/cli/main.js';
import { InputError } from '../../src/scenario/inputError.js';

describe('the option table', () => {
  it('declares options on a command and reads them back converted', async () => {
    const command = declare(new Command('try').exitOverride(), ['threads', 'set', 'quiet', 'pixelUm', 'shade', 'resume'], { threads: { default: '2' } });
    let seen: Record<string, unknown> = {};
    command.action((options) => {
      seen = readOptions(options, ['threads', 'set', 'quiet', 'pixelUm', 'shade', 'resume']);
    });
    await command.parseAsync(['--set', 'a=1', '--set', 'b=2', '--quiet', '--pixel-um', '0.25', '--shade', 'density', '--resume'], { from: 'user' });
    expect(seen).toEqual({ threads: 2, set: ['a=1', 'b=2'], quiet: true, pixelUm: 0.25, shade: 'density', resume: true });
  });

  it('refusals name the option', () => {
    expect(() => readOptions({ threads: '0x10' }, ['threads'])).toThrow(/^--threads: expected a whole number from 1 to 256, got "0x10"$/);
    expect(() => readOptions({ shade: 'rainbow' }, ['shade'])).toThrow(/^--shade: expected phi or density, got "rainbow"$/);
    expect(() => readOptions({ parallelOver: 'gpu' }, ['parallelOver'])).toThrow(/^--parallel-over: expected auto, realisations or lattice, got "gpu"$/);
    expect(() => readOptions({ wavelengthNm: '-5' }, ['wavelengthNm'])).toThrow(InputError);
    expect(readOptions({}, ['threads', 'quiet'])).toEqual({});
  });

  it('every option of every command comes from the table', () => {
    const known = new Set<string>(Object.values(OPTION_TABLE).map((spec) => spec.flags));
    const program = buildProgram({ exitCode: 0 });
    for (const command of program.commands) {
      for (const option of command.options) expect(known.has(option.flags), `${command.name()} ${option.flags}`).toBe(true);
    }
  });
});
