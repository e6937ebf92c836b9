// Scenario key `landscape` end to end (issue 16): files relative to the scenario, units,
// lengths, records, and the checks the issue names:
// - a per-site file holding exactly the built-in harmonic trap gives the same cloud bit for bit
//   (its eps written to .npy and loaded as `sites` with the trap off);
// - gradients and boxes against site energies worked out by hand from the constants
//   (h = 6.62607015e-34 J s exactly, SI 2019; g = 9.80665 m/s^2, standard gravity);
// - a combined superlattice in laboratory mode against independent plane-wave calculations
//   (bandStructure.ts / hubbardParameters.ts at the summed depth, a limit the Wannier code does
//   not know about).
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../../src/formats/npy.js';
import { encodeGray16 } from '../../src/formats/pngCodec.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { hubbardFromLab } from '../../src/physics/hubbardParameters.js';
import { latticeBand1d, meanBandEnergyEr } from '../../src/physics/bandStructure.js';
import { InputError } from '../../src/scenario/inputError.js';

const workDir = mkdtempSync(join(tmpdir(), 'tiercake-landscape-test-'));
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

/** Writes a scenario (and returns its path) in a folder of its own, so relative paths are tested. */
function scenarioFile(folder: string, name: string, body: Record<string, unknown>): string {
  const dir = join(workDir, folder);
  mkdirSync(dir, { recursive: true });
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, ...body }));
  return path;
}

const bits = (a: Float64Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

const hubbardLayer = {
  energyUnit: 'U',
  lattice: { shape: [14, 12] },
  hubbard: { hopping: 0.03 },
  particles: { atoms: 110 },
  truncation: { nmax: 5 },
};

const labLayer = {
  energyUnit: 'Hz',
  lattice: { shape: [12, 12] },
  laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 12, transverse: { trapFrequencyHz: 8000 } },
  particles: { atoms: 90 },
  truncation: { nmax: 5 },
};

describe('a per-site file holding the built-in trap reproduces the cloud bit for bit', () => {
  for (const [mode, base, trap] of [
    ['hubbard', hubbardLayer, { coefficient: [0.012, 0.02], centreSites: [6.3, 5.5] }],
    ['laboratory', labLayer, { frequencyHz: [45, 60] }],
  ] as const) {
    it(`${mode} mode`, async () => {
      const withTrap = scenarioFile(`trap-${mode}`, 'with-trap', { ...base, trap });
      const a = prepareScenario(withTrap, []);
      writeFileSync(join(workDir, `trap-${mode}`, 'trap-eps.npy'), encodeNpy(a.resolved.model.eps, a.resolved.geometry.shape));
      const fromFile = scenarioFile(`trap-${mode}`, 'from-file', { ...base, landscape: [{ kind: 'sites', file: 'trap-eps.npy' }] });
      const b = prepareScenario(fromFile, []);
      expect(b.resolved.trapCoefficient.every((k) => k === 0)).toBe(true);
      expect(bits(b.resolved.model.eps).equals(bits(a.resolved.model.eps))).toBe(true);
      const sa = await solveScenario(a, { threads: 1 });
      const sb = await solveScenario(b, { threads: 1 });
      expect(sa.outcome.converged).toBe(true);
      expect(bits(sb.fields.density).equals(bits(sa.fields.density))).toBe(true);
      expect(bits(sb.fields.condensateDensity).equals(bits(sa.fields.condensateDensity))).toBe(true);
      expect(sb.outcome.solve.mu).toBe(sa.outcome.solve.mu);
      // control: the file really matters (a slightly different trap gives a different cloud)
      const tilted = new Float64Array(a.resolved.model.eps);
      tilted[0] += 1e-3 * (a.resolved.units.interaction as number);
      writeFileSync(join(workDir, `trap-${mode}`, 'trap-eps.npy'), encodeNpy(tilted, a.resolved.geometry.shape));
      const c = prepareScenario(fromFile, []);
      expect(bits(c.resolved.model.eps).equals(bits(a.resolved.model.eps))).toBe(false);
    }, 60_000);
  }
});

describe('records, units and relative paths', () => {
  it('a sites file in J inside a U-unit scenario: values times J; record with SHA-256, min and max in U', () => {
    const shape = [14, 12];
    const values = new Float64Array(14 * 12);
    for (let i = 0; i < values.length; i++) values[i] = (i % 7) - 3; // -3 .. 3 J
    const bytes = encodeNpy(values, shape);
    mkdirSync(join(workDir, 'units', 'data'), { recursive: true });
    writeFileSync(join(workDir, 'units', 'data', 'tilt.npy'), bytes);
    const path = scenarioFile('units', 'units', { ...hubbardLayer, landscape: [{ kind: 'sites', file: 'data/tilt.npy', unit: 'J', name: 'measured' }] });
    const { resolved } = prepareScenario(path, []);
    for (let i = 0; i < values.length; i++) expect(resolved.model.eps[i]).toBeCloseTo(values[i] * 0.03, 15);
    const [record] = resolved.landscape.records;
    expect(record.name).toBe('measured');
    expect(record.kind).toBe('sites');
    expect(record.energyUnit).toBe('U');
    expect(record.minimum).toBeCloseTo(-0.09, 15);
    expect(record.maximum).toBeCloseTo(0.09, 15);
    expect(record.file?.path).toBe('data/tilt.npy');
    expect(record.file?.resolvedPath).toBe(join(workDir, 'units', 'data', 'tilt.npy'));
    expect(record.file?.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect(record.file?.bytes).toBe(bytes.length);
    expect(JSON.parse(JSON.stringify(resolved.landscape.records))).toEqual(resolved.landscape.records);
  });

  it('terms add up: the site potential is the sum of the fields of every term', () => {
    const path = scenarioFile('sum', 'sum', {
      ...hubbardLayer,
      trap: { coefficient: 0.01 },
      landscape: [
        { kind: 'gradient', direction: [1, 0], perSite: 0.05 },
        { kind: 'box', shape: 'disc', radius: 4, wallHeight: 2, edgeWidth: 0.5 },
        { kind: 'superlattice', axis: 'y', depth: 0.3, periodSites: 1.618, phaseRad: 0.4 },
      ],
    });
    const { resolved } = prepareScenario(path, []);
    const noTerms = prepareScenario(scenarioFile('sum', 'plain', { ...hubbardLayer, trap: { coefficient: 0.01 } }), []).resolved;
    const f = resolved.landscape.fields;
    expect(f.length).toBe(3);
    for (let i = 0; i < resolved.model.eps.length; i++) {
      expect(resolved.model.eps[i]).toBeCloseTo(noTerms.model.eps[i] + f[0][i] + f[1][i] + f[2][i], 13);
    }
    expect(resolved.landscape.records.map((r) => r.name)).toEqual(['gradient-0', 'box-1', 'superlattice-2']);
    expect(resolved.landscape.records[1].maximum).toBeLessThanOrEqual(2);
    expect(resolved.landscape.records[1].maximum).toBeGreaterThan(1.99);
  });
});

describe('gradients and boxes in laboratory units against hand-computed site energies', () => {
  const spacingM = 1064e-9 / 2;

  it('gravity along a tilted lattice: m g sin(tilt) a / h per site, and perUm gives the same', () => {
    const tilt = 0.1; // rad
    const g = 9.80665 * Math.sin(tilt);
    const a = prepareScenario(scenarioFile('gravity', 'acc', { ...labLayer, landscape: [{ kind: 'gradient', direction: [1, 0], accelerationMPerS2: g }] }), []).resolved;
    const mass = a.laboratory!.massKg;
    const perSiteHz = (mass * g * spacingM) / 6.62607015e-34;
    const shape = a.geometry.shape;
    for (let x = 0; x + 1 < shape[0]; x++) {
      for (let y = 0; y < shape[1]; y++) {
        const i = x * shape[1] + y;
        expect(a.model.eps[i + shape[1]] - a.model.eps[i]).toBeCloseTo(perSiteHz, 9);
      }
    }
    // zero at the lattice centre (between sites 5 and 6 of 12): sites 5 and 6 sit at -/+ half a step
    expect(a.model.eps[5 * 12 + 3]).toBeCloseTo(-perSiteHz / 2, 9);
    const b = prepareScenario(scenarioFile('gravity', 'per-um', { ...labLayer, landscape: [{ kind: 'gradient', direction: [1, 0], perUm: (perSiteHz / spacingM) * 1e-6 }] }), []).resolved;
    for (let i = 0; i < a.model.eps.length; i++) expect(b.model.eps[i]).toBeCloseTo(a.model.eps[i], 9);
  });

  it('a disc of radius 5 sites written in µm (2.66 µm at a = 0.532 µm) equals the same disc in sites', () => {
    const body = (radius: number, lengthUnit: string) => ({
      ...labLayer,
      landscape: [{ kind: 'box', shape: 'disc', radius, wallHeight: 200, edgeWidth: lengthUnit === 'um' ? 0.532 : 1, lengthUnit, offset: lengthUnit === 'um' ? [0.266, 0] : [0.5, 0] }],
    });
    const um = prepareScenario(scenarioFile('disc', 'um', body(2.66, 'um')), []).resolved;
    const sites = prepareScenario(scenarioFile('disc', 'sites', body(5, 'sites')), []).resolved;
    for (let i = 0; i < um.model.eps.length; i++) expect(um.model.eps[i]).toBeCloseTo(sites.model.eps[i], 9);
    // Hand values: centre (x, y) = (6, 5.5) in site coordinates. Site (6, 5) is 0.5 from it:
    // 200 (1 - Phi(4.5)); site (11, 5): rho = 5.0249, 200 (1 - Phi(5 - rho)) (CPython NormalDist).
    expect(sites.model.eps[6 * 12 + 5]).toBeCloseTo(200 * 3.3976731247387093e-6, 9);
    const rho = Math.hypot(5, 0.5);
    expect(rho).toBeCloseTo(5.024937810560445, 12);
    expect(sites.model.eps[11 * 12 + 5]).toBeCloseTo(200 * 0.5099477159310533, 9);
  });

  it('laboratory mode insists on a length unit for a box', () => {
    expect(() => prepareScenario(scenarioFile('disc', 'no-unit', { ...labLayer, landscape: [{ kind: 'box', shape: 'disc', radius: 3, wallHeight: 1 }] }), [])).toThrow(
      /landscape\[0\]\.lengthUnit: required in laboratory mode/,
    );
  });
});

describe('potential pictures from files', () => {
  it('a 16-bit PNG: one bright grey level lands on x = column, y = row, times energyPerLevel', () => {
    const W = 14;
    const H = 12;
    const grey = new Uint16Array(W * H);
    grey[3 * W + 9] = 40000; // row 3, column 9
    mkdirSync(join(workDir, 'picture'), { recursive: true });
    writeFileSync(join(workDir, 'picture', 'dmd.png'), encodeGray16(W, H, grey));
    const path = scenarioFile('picture', 'png', { ...hubbardLayer, landscape: [{ kind: 'image', file: 'dmd.png', energyPerLevel: 1e-4, pixelSize: 1 }] });
    const { resolved } = prepareScenario(path, []);
    const eps = resolved.landscape.fields[0];
    for (let x = 0; x < 14; x++) for (let y = 0; y < 12; y++) expect(eps[x * 12 + y]).toBeCloseTo(x === 9 && y === 3 ? 4 : 0, 12);
    expect(resolved.landscape.records[0].file?.format).toBe('png');
    expect(resolved.landscape.records[0].file?.shape).toEqual([12, 14]);
    expect(resolved.landscape.records[0].method).toMatch(/bilinear/);
  });
});

describe('combined superlattice (laboratory mode) against plane-wave calculations', () => {
  const s1 = 9;
  it('a second lattice of the same wavelength at phase 0 gives J, U and site energies of the summed depth', () => {
    const v2Er = 2.5;
    const path = scenarioFile('super', 'same-period', {
      ...labLayer,
      landscape: [{ kind: 'superlattice', axis: 'x', depthEr: v2Er, wavelengthNm: 1064, tunnelling: 'combined' }],
      laboratory: { ...labLayer.laboratory, depthEr: s1 },
    });
    const { resolved } = prepareScenario(path, []);
    const deeper = hubbardFromLab({ species: '87Rb', wavelengthNm: 1064, depthEr: [s1 + v2Er, s1], confinementFrequencyHz: [8000] });
    const hop = resolved.model.hopping;
    expect(hop[0]).toBeInstanceOf(Float64Array);
    expect(typeof hop[1]).toBe('number');
    const jx = hop[0] as Float64Array;
    // 2e-5: the finite-difference error left after the ratio to the plain lattice (physics test).
    for (let i = 0; i < 11 * 12; i++) expect(Math.abs(jx[i] / deeper.latticeAxes[0].tunnellingHz - 1)).toBeLessThan(2e-5);
    expect(hop[1]).toBe(resolved.laboratory!.hoppingHz[1]);
    const u = resolved.model.interactionU as Float64Array;
    for (let i = 0; i < u.length; i++) expect(Math.abs(u[i] / deeper.interactionHz - 1)).toBeLessThan(2e-5);
    const recoil = resolved.laboratory!.hubbard.latticeAxes[0].recoilHz;
    const shift = (meanBandEnergyEr(latticeBand1d(s1 + v2Er)) - meanBandEnergyEr(latticeBand1d(s1))) * recoil;
    for (const e of resolved.landscape.fields[0]) expect(Math.abs(e - shift)).toBeLessThan(1e-4 * recoil);
    const rec = resolved.landscape.records[0];
    expect(rec.combined?.axis).toBe(0);
    expect(rec.combined?.periodSites).toBe(1);
    expect(rec.combined?.amplitudeEr).toBeCloseTo(v2Er, 12);
  }, 60_000);

  it('an incommensurate second lattice makes every bond and every U different; sampled mode leaves J and U alone', () => {
    const sl = { kind: 'superlattice', axis: 'x', depthEr: 1.5, wavelengthNm: 1064 * 1.618034 };
    const combined = prepareScenario(scenarioFile('super', 'golden', { ...labLayer, landscape: [{ ...sl, tunnelling: 'combined' }] }), []).resolved;
    const jx = combined.model.hopping[0] as Float64Array;
    const row = Array.from({ length: 11 }, (_, x) => jx[x * 12]);
    expect(new Set(row.map((v) => v.toPrecision(8))).size).toBe(11);
    const rec = combined.landscape.records[0].combined!;
    expect(rec.hoppingRelative.min).toBeLessThan(1);
    expect(rec.hoppingRelative.max).toBeGreaterThan(rec.hoppingRelative.min * 1.01);
    expect(rec.interactionRelative.max).toBeGreaterThan(rec.interactionRelative.min);
    const sampled = prepareScenario(scenarioFile('super', 'golden-sampled', { ...labLayer, landscape: [sl] }), []).resolved;
    expect(typeof sampled.model.hopping[0]).toBe('number');
    expect(typeof sampled.model.interactionU).toBe('number');
    // sampled: V2 sin^2(pi x / P), V2 = 1.5 E_r of the second wavelength (h^2 / (2 m lambda2^2))
    const recoil2 = combined.laboratory!.hubbard.latticeAxes[0].recoilHz / 1.618034 ** 2;
    for (let x = 0; x < 12; x++) {
      expect(sampled.landscape.fields[0][x * 12 + 4]).toBeCloseTo(1.5 * recoil2 * Math.sin((Math.PI * x) / 1.618034) ** 2, 8);
    }
  }, 60_000);

  it('combined tunnelling needs laboratory mode', () => {
    const path = scenarioFile('super', 'hubbard', { ...hubbardLayer, landscape: [{ kind: 'superlattice', depth: 0.2, periodSites: 2, tunnelling: 'combined' }] });
    expect(() => prepareScenario(path, [])).toThrow(InputError);
    expect(() => prepareScenario(path, [])).toThrow(/landscape\[0\]\.tunnelling: tunnelling "combined" needs laboratory mode/);
  });
});

describe('the transverse lattice may have its own wavelength', () => {
  it('U follows the transverse Wannier function of that wavelength (hubbardFromLab with per-axis wavelengths)', () => {
    const body = { ...labLayer, laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 12, transverse: { depthEr: 30, wavelengthNm: 532 } } };
    const { resolved } = prepareScenario(scenarioFile('transverse', 'layer', body), []);
    const ref = hubbardFromLab({ species: '87Rb', wavelengthNm: [1064, 1064, 532], depthEr: [12, 12, 30] });
    expect(resolved.laboratory!.interactionHz).toBe(ref.interactionHz);
    const same = prepareScenario(scenarioFile('transverse', 'same', { ...body, laboratory: { ...body.laboratory, transverse: { depthEr: 30 } } }), []).resolved;
    expect(same.laboratory!.interactionHz).toBe(hubbardFromLab({ species: '87Rb', wavelengthNm: 1064, depthEr: [12, 12, 30] }).interactionHz);
    expect(resolved.laboratory!.interactionHz).toBeGreaterThan(same.laboratory!.interactionHz);
  });
});

describe('file checks', () => {
  it('reads the file relative to the scenario, not the working directory', () => {
    mkdirSync(join(workDir, 'rel', 'deep'), { recursive: true });
    writeFileSync(join(workDir, 'rel', 'deep', 'p.npy'), encodeNpy(new Float64Array(14 * 12).fill(0.25), [14, 12]));
    const path = scenarioFile('rel', 'rel', { ...hubbardLayer, landscape: [{ kind: 'sites', file: 'deep/p.npy' }] });
    expect(prepareScenario(path, []).resolved.model.eps[7]).toBe(0.25);
    expect(readFileSync(path, 'utf8')).toContain('deep/p.npy');
  });
});
