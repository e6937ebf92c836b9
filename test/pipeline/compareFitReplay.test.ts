// The Levenberg-Marquardt fit with an asynchronous model (src/pipeline/compareFitReplay.ts),
// by deterministic replay: it must reach the closed-form least-squares straight line and
// agree bit for bit with the synchronous fit it replays, and points the model can answer at
// once (modelSync) must cost no replay.

import { describe, expect, it } from 'vitest';
import { replayLeastSquaresFit } from '../../src/pipeline/compareFitReplay.js';
import { leastSquaresFit } from '../../src/numerics/leastSquaresFit.js';

describe('replayed least-squares fit', () => {
  // A straight line y = a + b x has the closed-form least-squares solution of the normal
  // equations (Bevington & Robinson, 3rd ed., eq. 6.12): the asynchronous replay must
  // reach it and agree bit for bit with the synchronous fit it replays.
  it('matches the synchronous fit and the closed-form straight line', async () => {
    const x = Float64Array.from({ length: 9 }, (_, i) => i);
    const y = Float64Array.from(x, (v, i) => 1.5 + 0.7 * v + (i % 3 === 0 ? 0.1 : -0.05));
    const line = (p: Float64Array) => Float64Array.from(x, (v) => p[0] + p[1] * v);
    const problem = { data: y, sigma: 0.1, initial: [0, 0] };
    const sync = leastSquaresFit({ ...problem, model: line });
    const replay = await replayLeastSquaresFit({ ...problem, model: async (p) => line(p) });
    expect(Array.from(replay.best)).toEqual(Array.from(sync.best));
    expect(replay.chiSquare).toBe(sync.chiSquare);
    const n = x.length;
    const sx = x.reduce((s, v) => s + v, 0);
    const sy = y.reduce((s, v) => s + v, 0);
    const sxx = x.reduce((s, v) => s + v * v, 0);
    const sxy = x.reduce((s, v, i) => s + v * y[i], 0);
    const delta = n * sxx - sx * sx;
    expect(replay.best[0]).toBeCloseTo((sxx * sy - sx * sxy) / delta, 8);
    expect(replay.best[1]).toBeCloseTo((n * sxy - sx * sy) / delta, 8);
    expect(replay.distinctEvaluations).toBeLessThanOrEqual(sync.modelEvaluations);
  });
});

describe('answers that need no waiting', () => {
  it('a model that can answer every point at once runs the fit once, with the same result', async () => {
    const x = Float64Array.from({ length: 12 }, (_, i) => i / 2);
    // y = 2 exp(-0.3 x) + noise: a non-linear model, several Levenberg-Marquardt steps.
    const y = Float64Array.from(x, (v, i) => 2 * Math.exp(-0.3 * v) + (i % 2 === 0 ? 0.01 : -0.01));
    const curve = (p: Float64Array) => Float64Array.from(x, (v) => p[0] * Math.exp(-p[1] * v));
    const problem = { data: y, sigma: 0.01, initial: [1, 0.1] };
    const sync = leastSquaresFit({ ...problem, model: curve });
    const waited = await replayLeastSquaresFit({ ...problem, model: async (p) => curve(p) });
    const immediate = await replayLeastSquaresFit({ ...problem, model: async () => { throw new Error('not needed'); }, modelSync: curve });
    expect(Array.from(immediate.best)).toEqual(Array.from(sync.best));
    expect(Array.from(waited.best)).toEqual(Array.from(sync.best));
    expect(immediate.replays).toBe(0);
    expect(waited.replays).toBe(waited.distinctEvaluations);
    // Mixed: only the points modelSync declines cost a replay.
    const mixed = await replayLeastSquaresFit({
      ...problem,
      model: async (p) => curve(p),
      modelSync: (p) => (p[0] === 1 ? undefined : curve(p)),
    });
    expect(Array.from(mixed.best)).toEqual(Array.from(sync.best));
    // The start [1, 0.1] and the finite-difference step in the second parameter keep p[0] = 1.
    expect(mixed.replays).toBeGreaterThanOrEqual(2);
    expect(mixed.replays).toBeLessThan(waited.replays);
  });
});
