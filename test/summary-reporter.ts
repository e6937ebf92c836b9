// Prints one plain closing line ("Tests: N passed, N failed, N skipped") that CI can read
// whatever colours or layout the default reporter uses.
import type { Reporter, TestModule } from 'vitest/node';

export default class SummaryReporter implements Reporter {
  onTestRunEnd(modules: ReadonlyArray<TestModule>): void {
    let passed = 0, failed = 0, skipped = 0;
    for (const m of modules) {
      for (const t of m.children.allTests()) {
        const state = t.result().state;
        if (state === 'passed') passed++;
        else if (state === 'failed') failed++;
        else skipped++;
      }
    }
    process.stdout.write(`Tests: ${passed} passed, ${failed} failed, ${skipped} skipped\n`);
  }
}
