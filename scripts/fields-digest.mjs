// Solves every bundled scenario (configs/*.json) with the built command line (dist/main.js)
// into a temporary folder and prints the sha256 of each fields/*.npy. Used to check that a
// refactoring leaves the numbers byte-identical: run before and after, compare the output.
//   node scripts/fields-digest.mjs [--threads N]
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const threadsAt = process.argv.indexOf('--threads');
const threads = threadsAt > 0 ? process.argv[threadsAt + 1] : '2';
const work = mkdtempSync(join(tmpdir(), 'tiercake-digest-'));
let failed = false;
try {
  const scenarios = readdirSync(join(root, 'configs')).filter((f) => f.endsWith('.json')).sort();
  for (const file of scenarios) {
    const out = join(work, file.replace(/\.json$/, ''));
    const run = spawnSync(process.execPath, [join(root, 'dist/main.js'), 'solve', join(root, 'configs', file), '--out', out, '--threads', threads, '--quiet'], { encoding: 'utf8' });
    if (run.status !== 0 && run.status !== 3) {
      process.stdout.write(`${file}: exit ${run.status}\n${run.stderr}\n`);
      failed = true;
      continue;
    }
    for (const npy of readdirSync(join(out, 'fields')).filter((f) => f.endsWith('.npy')).sort()) {
      const digest = createHash('sha256').update(readFileSync(join(out, 'fields', npy))).digest('hex');
      process.stdout.write(`${digest}  ${file.replace(/\.json$/, '')}/fields/${npy}\n`);
    }
  }
} finally {
  rmSync(work, { recursive: true, force: true });
}
process.exitCode = failed ? 1 : 0;
