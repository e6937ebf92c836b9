// The README stays true: its scenario reference is exactly what the schema generates, and
// the quick-start commands name files that exist.
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync } from 'node:fs';
import { configReferenceMarkdown } from '../src/scenario/configReference.js';

const readme = readFileSync(new URL('../README.md', import.meta.url), 'utf8');

describe('README', () => {
  it('has the generated scenario reference (run `npm run docs:keys` after changing the schema)', () => {
    const start = readme.indexOf('<!-- keys:start -->\n') + '<!-- keys:start -->\n'.length;
    const end = readme.indexOf('<!-- keys:end -->');
    expect(readme.slice(start, end)).toBe(configReferenceMarkdown());
  });
  it('quick start names a bundled scenario and the test command', () => {
    const quick = readme.slice(readme.indexOf('## Quick start'), readme.indexOf('## What it computes'));
    const scenario = /configs\/[\w.-]+\.json/.exec(quick)?.[0];
    expect(scenario).toBeDefined();
    expect(existsSync(new URL(`../${scenario}`, import.meta.url))).toBe(true);
    expect(quick).toContain('npm test');
  });
});

describe('bundled scenarios', () => {
  it('every file in configs/ is a valid scenario', async () => {
    const { readdirSync } = await import('node:fs');
    const { prepareScenario } = await import('../src/pipeline/prepareScenario.js');
    const dir = new URL('../configs/', import.meta.url);
    const files = readdirSync(dir).filter((f) => f.endsWith('.json'));
    expect(files.length).toBeGreaterThanOrEqual(4);
    for (const f of files) {
      const { scenario } = prepareScenario(new URL(f, dir).pathname, []);
      expect(scenario.name.length).toBeGreaterThan(0);
    }
  });
});
