// Running sbatch (src/output/sbatchRun.ts) with stand-in scripts: `--parsable` comes first,
// the job id is read from "id;cluster" (the form sbatch --parsable prints on a multi-cluster
// site) or "id"; a missing command, a refusal (its first stderr lines quoted) and output
// that is not a job id are input errors saying what to check.
import { chmodSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runSbatch } from '../../src/output/sbatchRun.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-sbatch-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
function script(name: string, body: string): string {
  const path = join(dir, name);
  writeFileSync(path, `#!/bin/bash\n${body}\n`);
  chmodSync(path, 0o755);
  return path;
}

describe('runSbatch', () => {
  it('passes --parsable first and reads the job id', () => {
    const log = join(dir, 'args.log');
    expect(runSbatch(script('multi', `echo "$*" > ${log}\necho "4321;cluster-a"`), ['--hold', '/x/jobs/shards.sbatch'])).toBe('4321');
    expect(readFileSync(log, 'utf8').trim()).toBe('--parsable --hold /x/jobs/shards.sbatch');
    expect(runSbatch(script('plain', 'echo "sbatch: note: ok" ; echo 77'), [])).toBe('77');
  });

  it('refuses a missing command, a refused job and output that is no job id', () => {
    expect(() => runSbatch(join(dir, 'no-such-sbatch'), [])).toThrow(/not found; run on a machine with SLURM .* or use --dry-run/);
    const refuses = script('refuses', 'echo "sbatch: error: invalid partition specified: nosuch" >&2\nexit 1');
    expect(() => runSbatch(refuses, [])).toThrow(`submit: ${refuses} refused the job (exit 1): sbatch: error: invalid partition specified: nosuch; check --partition, --time and --sbatch-option`);
    expect(() => runSbatch(script('chatty', 'echo "Submitted batch job 12"'), [])).toThrow(InputError);
    expect(() => runSbatch(script('chatty2', 'echo "Submitted batch job 12"'), [])).toThrow('printed "Submitted batch job 12", not a job id');
  });
});
