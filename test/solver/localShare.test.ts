// runLocalShare against the order of events its contract names, checked by recording them:
// the workers are always awaited before anything is thrown, a worker failure wins over a
// local one, and without failures both results come back unchanged.
import { describe, expect, it } from 'vitest';
import { runLocalShare } from '../../src/solver/localShare.js';

describe('runLocalShare', () => {
  it('returns the local value and the workers result', async () => {
    const r = await runLocalShare(() => 2.5, async () => [1, 7]);
    expect(r).toEqual({ local: 2.5, workers: [1, 7] });
  });

  it('waits for the workers before it rethrows a local error', async () => {
    const events: string[] = [];
    const run = runLocalShare(
      () => {
        events.push('local');
        throw new Error('local share broke');
      },
      async () => {
        await new Promise((resolve) => setTimeout(resolve, 5));
        events.push('workers done');
        return 0;
      },
    );
    await expect(run).rejects.toThrow('local share broke');
    expect(events).toEqual(['local', 'workers done']);
  });

  it('reports a worker failure before a local error', async () => {
    const run = runLocalShare(
      () => {
        throw new Error('local share broke');
      },
      async () => {
        throw new Error('worker 1 failed');
      },
    );
    await expect(run).rejects.toThrow('worker 1 failed');
  });

  it('rethrows whatever the local share threw, even a falsy value', async () => {
    const run = runLocalShare(
      () => {
        throw 0;
      },
      async () => 1,
    );
    await expect(run).rejects.toBe(0);
  });
});
