// The sbatch choices of `tiercake submit` (src/output/sbatchChoices.ts): SLURM time limits
// in the forms sbatch documents for --time (minutes, m:s, h:m:s, d-h, d-h:m, d-h:m:s),
// partition names, one extra option per --sbatch-option; the options submit writes itself
// are refused naming the option; each refusal is an InputError (exit 2).
// Mutation tried: dropping `dependency` from SET_BY_SUBMIT: the --dependency case passes the check and the test fails.
import { describe, expect, it } from 'vitest';
import { checkSbatchChoices } from '../../src/output/sbatchChoices.js';
import { InputError } from '../../src/scenario/inputError.js';

describe('sbatch choices', () => {
  it('accepts what sbatch accepts', () => {
    for (const time of ['30', '30:00', '02:00:00', '1-00', '1-00:30', '1-00:00:00']) expect(() => checkSbatchChoices({ time })).not.toThrow();
    expect(() => checkSbatchChoices({ partition: 'short,gpu-a_1.x', sbatchOptions: ['--account=lab42', '--mem-per-cpu=2G', '-q'] })).not.toThrow();
    expect(() => checkSbatchChoices({})).not.toThrow();
  });

  it('refuses a malformed value naming the option', () => {
    expect(() => checkSbatchChoices({ time: '2 hours' })).toThrow(/^--time: expected a SLURM time limit/);
    expect(() => checkSbatchChoices({ time: '1:2:3:4' })).toThrow(InputError);
    expect(() => checkSbatchChoices({ partition: 'a b' })).toThrow(/^--partition: expected a partition name/);
    expect(() => checkSbatchChoices({ sbatchOptions: ['--account lab42'] })).toThrow(/^--sbatch-option: expected one sbatch option/);
  });

  it('refuses the options submit sets itself', () => {
    for (const own of ['--array=0-9', '--output=x', '--error=y', '--dependency=afterok:1', '--cpus-per-task=4', '--job-name=j', '--parsable', '--wrap=ls']) {
      expect(() => checkSbatchChoices({ sbatchOptions: ['--account=lab42', own] })).toThrow(`--sbatch-option ${own}: submit sets this one itself`);
    }
    // the name ends at a word boundary, so a longer name that starts with one of them and a dash is taken for it
    expect(() => checkSbatchChoices({ sbatchOptions: ['--array-extra=1'] })).toThrow(/submit sets this one itself/);
  });
});
