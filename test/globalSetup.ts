// Builds dist/ once before the test run: tests that start the real command line in a child
// process (signals, exit codes, worker threads) run the compiled tool, as users do. Type
// errors are reported by `npm run typecheck`; tsc still emits, so they do not stop the tests.
// Also builds the WebAssembly site kernel (build/, skipped when up to date).
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

export default function setup(): void {
  const root = fileURLToPath(new URL('..', import.meta.url));
  const tsc = fileURLToPath(new URL('../node_modules/typescript/bin/tsc', import.meta.url));
  try {
    execFileSync(process.execPath, [tsc, '-p', '.'], { cwd: root, stdio: 'pipe' });
  } catch (err) {
    const out = (err as { stdout?: Buffer }).stdout?.toString() ?? '';
    process.stderr.write(`tsc reported problems while building dist/ for the tests:\n${out.slice(0, 2000)}\n`);
  }
  // A kernel that fails to build is an error: the tests would silently run one path only.
  execFileSync(process.execPath, [fileURLToPath(new URL('../scripts/build-kernel.mjs', import.meta.url)), '--strict'], { cwd: root, stdio: 'inherit' });
}
