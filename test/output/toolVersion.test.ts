// The tool version written into every output (src/output/toolVersion.ts) is the one in
// package.json.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { toolVersion } from '../../src/output/toolVersion.js';

describe('toolVersion', () => {
  it('is the version of package.json', () => {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
    expect(toolVersion()).toBe(pkg.version);
    expect(toolVersion()).toMatch(/^\d+\.\d+\.\d+/);
  });
});
