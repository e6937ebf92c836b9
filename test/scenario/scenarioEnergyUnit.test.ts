// The internal energy of one of each scenario energy unit (src/scenario/scenarioEnergyUnit.ts),
// checked against numbers written out here: a hand-made unit record, and a resolved
// laboratory scenario whose nK-to-Hz ratio must be k_B / h from the exact SI constants.

import { describe, expect, it } from 'vitest';
import { validateScenario } from '../../src/scenario/loadScenario.js';
import { resolveScenario } from '../../src/scenario/resolveScenario.js';
import { EnergyUnitSchema, internalEnergyPerUnit, type EnergyUnits } from '../../src/scenario/scenarioEnergyUnit.js';

describe('internalEnergyPerUnit', () => {
  it('reads J and U from the record and has no Hz, kHz or nK in dimensionless mode', () => {
    const units: EnergyUnits = { internal: 'J', hopping: 1, interaction: 12.5, hertz: null, nanokelvin: null };
    expect(internalEnergyPerUnit('J', units)).toBe(1);
    expect(internalEnergyPerUnit('U', units)).toBe(12.5);
    expect(internalEnergyPerUnit('Hz', units)).toBeNaN();
    expect(internalEnergyPerUnit('kHz', units)).toBeNaN();
    expect(internalEnergyPerUnit('nK', units)).toBeNaN();
  });

  it('gives 1 kHz = 1000 Hz and reads nK from the record in laboratory mode', () => {
    // internal unit Hz: one Hz is 1 by definition (hand-made record, values chosen here)
    const units: EnergyUnits = { internal: 'Hz', hopping: 71.25, interaction: 1480, hertz: 1, nanokelvin: 20.836619 };
    expect(internalEnergyPerUnit('Hz', units)).toBe(1);
    expect(internalEnergyPerUnit('kHz', units)).toBe(1000);
    expect(internalEnergyPerUnit('nK', units)).toBe(20.836619);
    expect(internalEnergyPerUnit('J', units)).toBe(71.25);
    expect(internalEnergyPerUnit('U', units)).toBe(1480);
  });

  it('gives k_B x 1 nK / h for nK over Hz in a resolved laboratory scenario', () => {
    const scenario = validateScenario(
      {
        name: 'lab-units',
        lattice: { shape: [6, 6] },
        laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 12, transverse: { trapFrequencyHz: 8000 } },
        trap: { frequencyHz: 40 },
        particles: { atoms: 20 },
        temperature: { kT: 5 },
      },
      'lab-units',
    );
    const units = resolveScenario(scenario).units;
    // exact SI (2019): k_B = 1.380649e-23 J/K, h = 6.62607015e-34 J s -> 20.836619... Hz per nK
    const kbOverHPerNk = (1.380649e-23 / 6.62607015e-34) * 1e-9;
    expect(internalEnergyPerUnit('nK', units) / internalEnergyPerUnit('Hz', units)).toBeCloseTo(kbOverHPerNk, 9);
    expect(internalEnergyPerUnit('kHz', units) / internalEnergyPerUnit('Hz', units)).toBeCloseTo(1000, 9);
  });
});

describe('EnergyUnitSchema', () => {
  it('accepts exactly the five unit names', () => {
    for (const name of ['J', 'U', 'Hz', 'kHz', 'nK']) expect(EnergyUnitSchema.parse(name)).toBe(name);
    for (const name of ['mHz', 'hz', 'K', '']) expect(EnergyUnitSchema.safeParse(name).success).toBe(false);
  });
});
