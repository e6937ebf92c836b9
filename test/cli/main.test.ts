// The entry point's mapping of outcomes to exit codes (src/cli/main.ts, DESIGN.md section 6):
// an InputError is printed as it is (control characters escaped) and exits 2, anything else
// is an internal error: one line saying so, the stack only with --debug (or TIERCAKE_DEBUG).

import { describe, expect, it, vi } from 'vitest';
import { inputErrorText, internalErrorText, runCli } from '../../src/cli/main.js';
import { InputError } from '../../src/scenario/inputError.js';

async function quietly(argv: string[]): Promise<number> {
  const out = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
  try {
    return await runCli(argv);
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}

describe('exit codes and messages', () => {
  it('input errors: escaped, each line capped', () => {
    expect(inputErrorText(new InputError('--out x\u001b[2J: bad'))).toBe('tiercake: --out x\\u001b[2J: bad\n');
    expect(inputErrorText(new InputError('y'.repeat(1000))).length).toBeLessThan(420);
  });

  it('internal errors: one line that says it is a bug, the stack only when asked', () => {
    const err = new TypeError('cannot read x of undefined\nsecond line');
    const plain = internalErrorText(err, false);
    expect(plain).toBe('tiercake: internal error: cannot read x of undefined\n  this is a bug in tiercake, not in your input; run again with --debug for the details\n');
    const debug = internalErrorText(err, true);
    expect(debug).toContain('TypeError: cannot read x of undefined');
    expect(debug).toMatch(/\n\s+at /);
  });

  it('help and version exit 0, an unknown command or option 2', async () => {
    expect(await quietly(['--version'])).toBe(0);
    expect(await quietly(['--help'])).toBe(0);
    expect(await quietly(['no-such-command'])).toBe(2);
    expect(await quietly(['solve', 'x.json', '--no-such-option'])).toBe(2);
    expect(await quietly(['--debug', 'keys'])).toBe(0);
  });
});
