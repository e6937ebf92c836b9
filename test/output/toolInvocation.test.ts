// How batch scripts start this tiercake (src/output/toolInvocation.ts): the node running
// now and this checkout's dist/main.js (built by the test setup, test/globalSetup.ts), both
// absolute and with links resolved, so a job on any node with the same file system runs
// the same program whatever its working folder.
import { realpathSync } from 'node:fs';
import { isAbsolute } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { toolInvocation } from '../../src/output/toolInvocation.js';

describe('toolInvocation', () => {
  it('is [node, dist/main.js], absolute and real', () => {
    const [node, main, ...rest] = toolInvocation();
    expect(rest).toEqual([]);
    expect(node).toBe(realpathSync(process.execPath));
    expect(main).toBe(realpathSync(fileURLToPath(new URL('../../dist/main.js', import.meta.url))));
    expect(isAbsolute(main)).toBe(true);
  });
});
