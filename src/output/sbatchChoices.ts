// The choices of `tiercake submit` that go into the batch scripts as sbatch options
// (--time, --partition, --sbatch-option), checked before anything is written: a value
// sbatch would refuse, or one that would break the script line it is written on, is an
// input error naming the option; the options submit sets itself cannot be given twice.

import { isSlurmTime } from './batchScripts.js';
import { InputError } from '../scenario/inputError.js';

export interface SbatchChoices {
  time?: string;
  partition?: string;
  /** --sbatch-option, in the order given */
  sbatchOptions?: readonly string[];
}

/** The options submit writes itself (the array, the logs, the dependency, the cores, the name, the job id output). */
const SET_BY_SUBMIT = /^--(array|output|error|dependency|cpus-per-task|job-name|parsable|wrap)\b/;

export function checkSbatchChoices(c: SbatchChoices): void {
  if (c.time !== undefined && !isSlurmTime(c.time)) throw new InputError(`--time: expected a SLURM time limit such as 30 (minutes), 02:00:00 or 1-00:00:00, got ${JSON.stringify(c.time)}`);
  if (c.partition !== undefined && !/^[A-Za-z0-9_.,-]+$/.test(c.partition)) throw new InputError(`--partition: expected a partition name (letters, digits, '_', '-', '.', ','), got ${JSON.stringify(c.partition)}`);
  for (const extra of c.sbatchOptions ?? []) {
    if (!/^--?[A-Za-z][A-Za-z0-9-]*(=\S+)?$/.test(extra)) {
      throw new InputError(`--sbatch-option: expected one sbatch option such as --account=lab42 or --mem-per-cpu=2G, got ${JSON.stringify(extra)}`);
    }
    if (SET_BY_SUBMIT.test(extra)) {
      throw new InputError(`--sbatch-option ${extra}: submit sets this one itself; use its own option (--cpus-per-task, --hold) or leave it out`);
    }
  }
}
