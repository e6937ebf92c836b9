// The meaning of a radius (src/observables/radialFrame.ts): any trapped axis makes it the
// trap-scaled radius; no trap with an open axis leaves the distance from the lattice centre;
// no trap and all axes periodic (a torus, translation-invariant up to disorder) has no centre.
import { describe, expect, it } from 'vitest';
import { radialFrame, radiusLabel, scenarioRadialFrame, shellRadiusNote } from '../../src/observables/radialFrame.js';

describe('radialFrame', () => {
  it('classifies the lattice by trap and boundary', () => {
    expect(radialFrame([0.01, 0.01], [false, false])).toBe('trap');
    expect(radialFrame([0, 0.01], [true, true])).toBe('trap'); // one trapped axis is enough
    expect(radialFrame([0, 0], [false, false])).toBe('latticeCentre');
    expect(radialFrame([0, 0, 0], [true, true, false])).toBe('latticeCentre');
    expect(radialFrame([0, 0], [true, true])).toBe('none');
  });

  it('labels say what is measured', () => {
    expect(radiusLabel('trap')).toBe('trap-scaled radius');
    expect(radiusLabel('latticeCentre')).not.toMatch(/trap-scaled/);
    expect(shellRadiusNote('none')).toMatch(/no radii/);
  });

  it('reads the frame of a scenario as written', () => {
    expect(scenarioRadialFrame({ lattice: { shape: [8, 8], boundary: 'periodic' } })).toBe('none');
    expect(scenarioRadialFrame({ lattice: { shape: [8, 8], boundary: ['periodic', 'open'] } })).toBe('latticeCentre');
    expect(scenarioRadialFrame({ lattice: { shape: [8, 8], boundary: 'periodic' }, trap: { coefficient: [0, 0.01] } })).toBe('trap');
    expect(scenarioRadialFrame({ lattice: { shape: [8, 8], boundary: 'periodic' }, trap: { frequencyHz: 40 } })).toBe('trap');
    expect(scenarioRadialFrame({ lattice: { shape: [8, 8], boundary: 'periodic' }, laboratory: { beamWaistUm: 100 } })).toBe('trap');
    expect(scenarioRadialFrame({ lattice: { shape: [8, 8], boundary: 'periodic' }, trap: { coefficient: 0 } })).toBe('none');
  });
});
