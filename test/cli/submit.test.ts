// `tiercake submit` and `tiercake progress` without a scheduler (issue 20; the run under a
// real one-node SLURM is `npm run test:cluster`). A stand-in `sbatch` on PATH records its
// arguments and prints job ids as `sbatch --parsable` does; the array script that submit
// writes is then run here by bash once per task with SLURM_ARRAY_TASK_ID set, as SLURM
// would run it, and the merge script after them. Checked against: the single-machine
// `ensemble`/`scan` run of the same scenario, byte for byte (the shard design); the
// folder state that progress reports, made by hand (tasks run, a task left out, a staging
// folder of a task that is still running).
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, realpathSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runSubmitCommand, parseShardList } from '../../src/cli/commands/submit.js';
import { runProgressCommand } from '../../src/cli/commands/progress.js';
import { shellQuote } from '../../src/output/batchScripts.js';
import { ExitCode, InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-submit-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const cli = realpathSync(fileURLToPath(new URL('../../dist/main.js', import.meta.url)));

const bin = join(dir, 'bin');
const sbatchLog = join(dir, 'sbatch.log');
const savedPath = process.env.PATH;
beforeAll(() => {
  mkdirSync(bin);
  // Job ids from 101 on; one line of arguments per call.
  writeFileSync(
    join(bin, 'sbatch'),
    `#!/bin/bash\nn=$(cat ${shellQuote(join(dir, 'counter'))} 2>/dev/null || echo 100)\nn=$((n + 1))\necho $n > ${shellQuote(join(dir, 'counter'))}\necho "$*" >> ${shellQuote(sbatchLog)}\necho "$n;onenode"\n`,
  );
  chmodSync(join(bin, 'sbatch'), 0o755);
  writeFileSync(join(bin, 'sbatch-refuses'), '#!/bin/bash\necho "sbatch: error: invalid partition specified: nosuch" >&2\nexit 1\n');
  chmodSync(join(bin, 'sbatch-refuses'), 0o755);
  process.env.PATH = `${bin}:${savedPath}`;
});
afterAll(() => {
  process.env.PATH = savedPath;
});

const ensembleScenario = join(dir, 'box.json');
writeFileSync(
  ensembleScenario,
  JSON.stringify({
    name: 'box',
    energyUnit: 'U',
    truncation: { nmax: 4 },
    lattice: { shape: [12, 12] },
    hubbard: { hopping: 0.022 },
    trap: { coefficient: 0.02 },
    disorder: { kind: 'box', width: 0.8, seed: 'w' },
    particles: { chemicalPotential: 1.0 },
  }),
);
const scanScenario = join(dir, 'layer.json');
writeFileSync(scanScenario, JSON.stringify({ name: 'layer', energyUnit: 'U', truncation: { nmax: 4 }, lattice: { shape: [16, 16] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.02 }, particles: { chemicalPotential: 1.2 } }));

let captured = '';
async function run(fn: () => Promise<number>): Promise<{ code: number; stdout: string; message: string }> {
  captured = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => {
    captured += String(c);
    return true;
  });
  const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
  try {
    return { code: await fn(), stdout: captured, message: '' };
  } catch (e) {
    if (e instanceof InputError) return { code: ExitCode.badInput, stdout: captured, message: e.message };
    throw e;
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}
afterEach(() => vi.restoreAllMocks());

/** Run the array script as SLURM would for the given tasks, then (optionally) the merge script. */
function runTasks(folder: string, tasks: readonly number[]): void {
  for (const k of tasks) {
    const r = spawnSync('bash', [join(folder, 'jobs', 'shards.sbatch')], { env: { ...process.env, SLURM_ARRAY_TASK_ID: String(k) }, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
  }
}
function runMergeScript(folder: string): number {
  return spawnSync('bash', [join(folder, 'jobs', 'merge.sbatch')], { encoding: 'utf8' }).status ?? -1;
}

const ensembleArgs = { ensemble: '8', blockSize: '2', shards: '4' };

describe('submit --dry-run', () => {
  it('prints the array and merge scripts with absolute paths and the sbatch commands; writes nothing', async () => {
    const out = join(dir, 'dry');
    const r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, cpusPerTask: '2', time: '00:30:00', partition: 'short', sbatchOption: ['--account=lab42'], dryRun: true, out }));
    expect(r.code).toBe(0);
    expect(existsSync(out)).toBe(false);
    const node = realpathSync(process.execPath);
    expect(r.stdout).toContain(`${node} ${cli} ensemble ${ensembleScenario} --realisations 8 --block-size 2 --out ${out}/shards --shard-from-env SLURM_ARRAY_TASK_ID --shards 4 --threads 2`);
    for (const line of ['#SBATCH --array=0-3', '#SBATCH --cpus-per-task=2', '#SBATCH --time=00:30:00', '#SBATCH --partition=short', '#SBATCH --account=lab42', `#SBATCH --output=${out}/logs/shard-%a.log`]) {
      expect(r.stdout).toContain(line);
    }
    expect(r.stdout).toContain(`exec ${node} ${cli} merge ${out}/shards --out ${out}/result`);
    expect(r.stdout).toContain(`sbatch --parsable ${out}/jobs/shards.sbatch`);
    expect(r.stdout).toMatch(/--dependency=afterok:<array job id> .*merge\.sbatch/);
    expect(existsSync(sbatchLog)).toBe(false);
  });

  it('refuses bad settings naming the option', async () => {
    const cases: Array<[Record<string, string | boolean | string[]>, RegExp]> = [
      [{ ...ensembleArgs, time: '2 hours' }, /--time: expected a SLURM time limit/],
      [{ ...ensembleArgs, partition: 'a b' }, /--partition: expected a partition name/],
      [{ ...ensembleArgs, sbatchOption: ['--array=0-9'] }, /--sbatch-option --array=0-9: submit sets this one itself/],
      [{ ensemble: '8' }, /--shards: required/],
      [{ shards: '4' }, /give either --ensemble N .* or --scan/],
      [{ ...ensembleArgs, scan: true, vary: ['hubbard.hopping=0.01,0.02'] }, /give either --ensemble N/],
      [{ ...ensembleArgs, chainLength: '2' }, /--chain-length: belongs to --scan/],
      [{ ...ensembleArgs, onlyShards: '4' }, /--only-shards: expected a whole number from 0 to 3/],
    ];
    for (const [args, message] of cases) {
      const r = await run(() => runSubmitCommand(ensembleScenario, { ...args, dryRun: true, out: join(dir, 'never') }));
      expect(r.code, JSON.stringify(args)).toBe(2);
      expect(r.message).toMatch(message);
    }
    expect(parseShardList('0-2,5', 8)).toEqual([0, 1, 2, 5]);
  });
});

describe('submit, tasks run as SLURM would, progress, resubmission', () => {
  const out = join(dir, 'ens');
  it('an ensemble: array + afterok merge; merged result equals the single run; a left-out task is named and resubmitted', async () => {
    const r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, out }));
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/submitted shard tasks 0-3 of 4 as job array 101/);
    expect(r.stdout).toMatch(/merge job 102 runs when every task has succeeded \(afterok:101\)/);
    expect(r.stdout).toContain('squeue -j 101,102');
    const calls = readFileSync(sbatchLog, 'utf8').trim().split('\n');
    expect(calls).toEqual([`--parsable ${out}/jobs/shards.sbatch`, `--parsable --dependency=afterok:101 ${out}/jobs/merge.sbatch`]);
    for (const f of ['submit.json', 'jobs/shards.sbatch', 'jobs/merge.sbatch', 'jobs.jsonl', '.tiercake-output.json']) expect(existsSync(join(out, f)), f).toBe(true);
    expect(existsSync(join(out, 'logs'))).toBe(true);

    // Task 2 never runs (cancelled); a staging folder says task 3 is still running.
    runTasks(out, [0, 1]);
    mkdirSync(join(out, 'shards', '.shard-3-of-4.tmp-4242-abc', 'blocks', 'block-000003'), { recursive: true });
    let p = await run(() => runProgressCommand(out, {}));
    expect(p.stdout).toMatch(/done {5}0-1\n/);
    expect(p.stdout).toMatch(/started {2}3\n/);
    expect(p.stdout).toMatch(/missing {2}2 {2}\(nothing in the folder yet/);
    expect(p.stdout).toMatch(/shard 3: started, not finished \(1 block staged, last written \d+ s ago\)/);
    expect(p.stdout).toMatch(/merged {3}not yet/);
    const resubmit = p.stdout.split('\n').find((l) => l.includes('--only-shards 2 '));
    expect(resubmit).toBeDefined();
    expect(resubmit).toContain(`${cli} submit ${ensembleScenario} --ensemble 8 --block-size 2 --shards 4 --cpus-per-task 1 --only-shards 2 --out ${out}`);
    expect(p.stdout).toContain(`sbatch --array=2 ${out}/jobs/shards.sbatch`);
    expect(p.stdout).toContain('--only-shards 2-3 ');

    // The merge refuses the incomplete set, naming the missing shards.
    runTasks(out, [3]);
    rmSync(join(out, 'shards', '.shard-3-of-4.tmp-4242-abc'), { recursive: true });
    expect(runMergeScript(out)).toBe(2);
    expect(existsSync(join(out, 'result'))).toBe(false);

    // The printed command, run as printed (the stand-in sbatch is on PATH).
    const again = spawnSync('bash', ['-c', resubmit as string], { encoding: 'utf8' });
    expect(again.status, again.stderr).toBe(0);
    expect(again.stdout).toMatch(/submitted shard tasks 2 of 4 as job array 103/);
    expect(again.stdout).toMatch(/the earlier merge job 102 cannot run any more/);
    expect(readFileSync(sbatchLog, 'utf8')).toContain(`--parsable --array=2 ${out}/jobs/shards.sbatch`);
    expect(readFileSync(sbatchLog, 'utf8')).toContain(`--parsable --dependency=afterok:103 ${out}/jobs/merge.sbatch`);
    runTasks(out, [2]);
    expect(runMergeScript(out)).toBe(0);
    p = await run(() => runProgressCommand(out, {}));
    expect(p.stdout).toMatch(/done {5}0-3\n/);
    expect(p.stdout).toMatch(/merged {3}yes/);

    const single = join(dir, 'ens-single');
    execFileSync(process.execPath, [cli, 'ensemble', ensembleScenario, '--realisations', '8', '--block-size', '2', '--threads', '1', '--quiet', '--out', single]);
    for (const f of ['fields/density_mean.npy', 'fields/density_spread.npy', 'fields/condensate_mean.npy', 'fields/phase_fraction.npy', 'histograms.csv', 'realisations.csv']) {
      expect(readFileSync(join(out, 'result', f)).equals(readFileSync(join(single, f))), f).toBe(true);
    }
  });

  it('resubmission refuses a shard that is done and different work', async () => {
    let r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, onlyShards: '1', out }));
    expect(r.code).toBe(2);
    expect(r.message).toMatch(/--only-shards: shard 1 is done already/);
    r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, ensemble: '12', onlyShards: '2', out }));
    expect(r.code).toBe(2);
    expect(r.message).toMatch(/is different work: its tasks run .*--realisations 8/);
    r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, onlyShards: '2', out: join(dir, 'nothing-here') }));
    expect(r.message).toMatch(/holds no submit\.json; submit the whole array first/);
    // a second full submission into the same folder is refused (it holds shards and logs now)
    r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, out }));
    expect(r.code).toBe(2);
    expect(r.message).toMatch(/--out .*ens: the folder exists .*--force/);
  });

  it('a scan: the merged result equals the single run', async () => {
    const folder = join(dir, 'scan');
    const r = await run(() => runSubmitCommand(scanScenario, { scan: true, vary: ['hubbard.hopping=0.01:0.03:5'], chainLength: '2', shards: '3', out: folder }));
    expect(r.code).toBe(0);
    expect(readFileSync(join(folder, 'jobs', 'shards.sbatch'), 'utf8')).toContain(`scan ${scanScenario} --vary hubbard.hopping=0.01:0.03:5 --chain-length 2 --out ${folder}/shards`);
    runTasks(folder, [0, 1, 2]);
    expect(runMergeScript(folder)).toBe(0);
    const single = join(dir, 'scan-single');
    execFileSync(process.execPath, [cli, 'scan', scanScenario, '--vary', 'hubbard.hopping=0.01:0.03:5', '--chain-length', '2', '--threads', '1', '--quiet', '--out', single]);
    expect(readFileSync(join(folder, 'result', 'scan.csv')).equals(readFileSync(join(single, 'scan.csv')))).toBe(true);
    // more shards than chains: said, not refused
    const many = await run(() => runSubmitCommand(scanScenario, { scan: true, vary: ['hubbard.hopping=0.01:0.03:5'], chainLength: '2', shards: '5', dryRun: true, out: join(dir, 'many') }));
    expect(many.stdout).toMatch(/5 shards for 3 chains: shards 3-4 get no work/);
  });

  it('sbatch missing or refusing: the message names it', async () => {
    let r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, sbatch: join(bin, 'sbatch-refuses'), out: join(dir, 'refused') }));
    expect(r.code).toBe(2);
    expect(r.message).toMatch(/refused the job \(exit 1\): sbatch: error: invalid partition specified: nosuch; check --partition/);
    r = await run(() => runSubmitCommand(ensembleScenario, { ...ensembleArgs, sbatch: join(bin, 'no-such-sbatch'), out: join(dir, 'no-sbatch') }));
    expect(r.message).toMatch(/no-such-sbatch not found; run on a machine with SLURM .* or use --dry-run/);
  });

  it('progress on a folder of shards without a submission, and on a folder without either', async () => {
    const p = await run(() => runProgressCommand(join(dir, 'ens', 'shards'), {}));
    expect(p.stdout).toMatch(/4 shards\n {2}done {5}0-3/);
    expect(p.stdout).toMatch(/every shard is done; merge them/);
    const none = await run(() => runProgressCommand(dir, {}));
    expect(none.message).toMatch(/holds no submission \(submit\.json\) and no shard folders/);
  });
});

describe('README "On a cluster"', () => {
  it('its submit commands are valid (dry run here; npm run test:cluster runs them under SLURM)', async () => {
    const { runCli } = await import('../../src/cli/main.js');
    const readme = readFileSync(fileURLToPath(new URL('../../README.md', import.meta.url)), 'utf8');
    const block = readme.slice(readme.indexOf('<!-- cluster:start -->'), readme.indexOf('<!-- cluster:end -->'));
    const commands = block.split('\n').filter((l) => l.startsWith('tiercake submit '));
    expect(commands.length).toBe(2);
    const root = fileURLToPath(new URL('../..', import.meta.url));
    for (const line of commands) {
      const words = line
        .slice('tiercake '.length)
        .split(' ')
        .map((w) => (w.startsWith('configs/') ? join(root, w) : w.startsWith('runs/') ? join(dir, w) : w));
      const r = await run(() => runCli([...words, '--dry-run']));
      expect(r.code, line).toBe(0);
      expect(r.stdout).toContain('#SBATCH --array=0-3');
      expect(r.stdout).toContain('#SBATCH --time=00:20:00');
    }
  });
});
