// Submitting a batch script of `tiercake submit` to SLURM: runs sbatch --parsable and reads
// the job id it prints ("id" or "id;cluster"). Every failure is an InputError saying what
// to check (sbatch missing, the job refused, output that is not a job id).

import { spawnSync } from 'node:child_process';
import { InputError } from '../scenario/inputError.js';

/** Runs `command --parsable ...args` and returns the job id. */
export function runSbatch(command: string, args: readonly string[]): string {
  const r = spawnSync(command, ['--parsable', ...args], { encoding: 'utf8' });
  if (r.error) {
    const code = (r.error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(`submit: ${command} not found; run on a machine with SLURM (the cluster's login node), give --sbatch PATH, or use --dry-run`);
    throw new InputError(`submit: could not run ${command} (${code ?? r.error.message})`);
  }
  if (r.status !== 0) {
    throw new InputError(`submit: ${command} refused the job (exit ${r.status}): ${(r.stderr || r.stdout).trim().split('\n').slice(0, 4).join(' / ')}; check --partition, --time and --sbatch-option`);
  }
  const id = r.stdout.trim().split('\n').pop()?.split(';')[0]?.trim() ?? '';
  if (!/^\d+$/.test(id)) throw new InputError(`submit: ${command} printed ${JSON.stringify(r.stdout.trim().slice(0, 100))}, not a job id`);
  return id;
}
