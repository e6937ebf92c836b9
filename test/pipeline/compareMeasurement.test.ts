// Direct test of src/pipeline/compareMeasurement.ts: the unit and pixel size of a measured
// picture decided from option values, the scenario's kind and tiercake's sidecar. Checked
// against what the options say (counts per atom passed through, sidecar used only for what
// is missing, bin width in the scenario's unit), against sigma0 = 3 lambda^2 / 2 pi with the
// 87Rb D2 wavelength 780.241 209 686 nm (D. A. Steck, "Rubidium 87 D Line Data"; sigma0 =
// 2.907e-9 cm^2 there for the cycling transition; both recalled from memory), and against
// the refusals users meet (messages as today, named after the option).

import { describe, expect, it } from 'vitest';
import { absorptionRoles, checkCompareInputs, resolveCompareMeasurement, type CompareMeasurementOptions } from '../../src/pipeline/compareMeasurement.js';
import type { SidecarScale } from '../../src/imaging/camera/pictureSidecar.js';
import { InputError } from '../../src/scenario/inputError.js';

const lab = { dimensionless: false, species: '87Rb' };
const hubbard = { dimensionless: true };
const noSidecar = () => null;

function refusal(fn: () => unknown): string {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return (err as Error).message;
  }
  throw new Error('expected a refusal');
}

describe('checkCompareInputs', () => {
  const out = { out: 'cmp' };
  it('needs exactly one source and an output folder', () => {
    expect(refusal(() => checkCompareInputs(out))).toMatch(/^--image: give the measured picture/);
    expect(refusal(() => checkCompareInputs({ ...out, image: 'a.npy', absorptionFrames: 'a.npy,b.npy' }))).toBe('--image: give either --image or --absorption-frames, not both');
    expect(refusal(() => checkCompareInputs({ image: 'a.npy' }))).toBe('--out: give the folder for the comparison results');
    expect(() => checkCompareInputs({ ...out, image: 'a.npy', countsPerAtom: 2 })).not.toThrow();
  });
  it('keeps the options of one kind of source away from the other', () => {
    expect(refusal(() => checkCompareInputs({ ...out, absorptionFrames: 'a.npy,b.npy', countsPerAtom: 1 }))).toMatch(/^--counts-per-atom: absorption frames/);
    expect(refusal(() => checkCompareInputs({ ...out, absorptionFrames: 'a.npy,b.npy', backgroundFrame: 'd.npy' }))).toMatch(/^--background-frame: absorption frames take their dark frame/);
    for (const [key, flag] of [['saturationCounts', '--saturation-counts'], ['alpha', '--alpha'], ['odLimit', '--od-limit'], ['minProbeCounts', '--min-probe-counts'], ['crossSection', '--cross-section']] as const) {
      expect(refusal(() => checkCompareInputs({ ...out, image: 'a.npy', [key]: 1 }))).toBe(`${flag}: only for raw absorption frames (--absorption-frames)`);
    }
  });
  it('reads two or three absorption roles, no empty one', () => {
    expect(absorptionRoles(' a.tif , b.tif ')).toEqual(['a.tif', 'b.tif']);
    expect(absorptionRoles('a,b,c')).toEqual(['a', 'b', 'c']);
    for (const bad of ['a', 'a,b,c,d', 'a,,b']) expect(refusal(() => absorptionRoles(bad))).toBe(`--absorption-frames: expected WITH_ATOMS,PROBE_ONLY[,DARK] (two or three frame sources), got "${bad}"`);
  });
});

describe('resolveCompareMeasurement', () => {
  it('passes counts per atom and the pixel through, without reading the sidecar', () => {
    let asked = 0;
    const r = resolveCompareMeasurement({ image: 'pic.npy', countsPerAtom: 2.5, pixelUm: 0.7, binUm: 1.5 }, lab, () => {
      asked++;
      return null;
    });
    expect(asked).toBe(0);
    expect(r).toEqual({ measurement: { kind: 'counts', countsPerAtom: 2.5, unitSource: '--counts-per-atom' }, pixelSize: 0.7, binWidth: 1.5, scaleFrom: 'command-line options' });
  });
  it('takes what is missing from the sidecar of the first image, and only of a single --image', () => {
    const seen: string[] = [];
    const sidecar = (file: string): SidecarScale => {
      seen.push(file);
      return { file: 'out/images/in_situ.json', countsPerAtom: 4, pixelSize: 0.5, lengthUnit: 'sites' };
    };
    const r = resolveCompareMeasurement({ image: 'out/images/in_situ.gray16.png, other.png' }, hubbard, sidecar);
    expect(seen).toEqual(['out/images/in_situ.gray16.png']);
    expect(r.measurement).toEqual({ kind: 'counts', countsPerAtom: 4, unitSource: 'taken from out/images/in_situ.json' });
    expect(r.pixelSize).toBe(0.5);
    expect(r.scaleFrom).toBe('missing options taken from out/images/in_situ.json');
    // An HDF5 dataset address: the sidecar belongs to the file.
    resolveCompareMeasurement({ image: 'run.h5:/atoms', countsPerAtom: 1 }, hubbard, sidecar);
    expect(seen[1]).toBe('run.h5');
    // --shots: no sidecar is consulted.
    expect(refusal(() => resolveCompareMeasurement({ image: '/atoms', shots: 'shots/' }, hubbard, sidecar))).toBe('--pixel-sites: give the pixel size in lattice spacings');
    expect(seen.length).toBe(2);
  });
  it('refuses a sidecar pixel in the other unit, and lengths in the wrong unit', () => {
    const umSidecar = (): SidecarScale => ({ file: 'x.json', countsPerAtom: 1, pixelSize: 0.3, lengthUnit: 'um' });
    expect(refusal(() => resolveCompareMeasurement({ image: 'x.npy' }, hubbard, umSidecar))).toBe(
      "--pixel-sites: x.json gives the pixel size in µm, but the scenario is dimensionless; give --pixel-sites (or compare with a scenario of the picture's kind)",
    );
    // Given explicitly, the option wins over the sidecar's unit.
    expect(resolveCompareMeasurement({ image: 'x.npy', pixelSites: 1 }, hubbard, umSidecar).pixelSize).toBe(1);
    const o: CompareMeasurementOptions = { image: 'x.npy', countsPerAtom: 1 };
    expect(refusal(() => resolveCompareMeasurement({ ...o, pixelUm: 1 }, hubbard, noSidecar))).toMatch(/^--pixel-um: the scenario is dimensionless/);
    expect(refusal(() => resolveCompareMeasurement({ ...o, pixelSites: 1 }, lab, noSidecar))).toMatch(/^--pixel-sites: the scenario is in laboratory units/);
    expect(refusal(() => resolveCompareMeasurement({ ...o, pixelSites: 1, binUm: 2 }, hubbard, noSidecar))).toMatch(/^--bin-um: the scenario is dimensionless/);
    expect(refusal(() => resolveCompareMeasurement({ ...o, pixelUm: 1, binSites: 2 }, lab, noSidecar))).toMatch(/^--bin-sites: the scenario is in laboratory units/);
    expect(refusal(() => resolveCompareMeasurement(o, lab, noSidecar))).toBe('--pixel-um: give the pixel size in the object plane (camera pixel / magnification), in µm');
  });
  it('refuses a picture without a unit', () => {
    expect(refusal(() => resolveCompareMeasurement({ image: 'x.npy', pixelUm: 1 }, lab, noSidecar))).toMatch(/^--counts-per-atom: the measured picture has no unit/);
  });
  it('takes sigma0 of the 87Rb D2 line for absorption frames, or the option', () => {
    const r = resolveCompareMeasurement({ absorptionFrames: 'a.tif,b.tif', pixelUm: 1, saturationCounts: 3000, odLimit: 4 }, lab, noSidecar);
    if (r.measurement.kind !== 'absorption') throw new Error('expected absorption');
    // Steck, Rubidium 87 D Line Data: lambda(D2) = 780.241 209 686 nm (vacuum), sigma0 = 3 lambda^2 / 2 pi = 2.907e-9 cm^2 = 0.2907 µm^2.
    expect(r.measurement.crossSection).toBeCloseTo((3 * 0.780241209686 ** 2) / (2 * Math.PI), 12);
    expect(r.measurement.crossSection).toBeCloseTo(0.2907, 4);
    expect(r.measurement.crossSectionSource).toMatch(/^3 lambda\^2 \/ 2 pi of the 87Rb D2 line, lambda = 780.241209686 nm/);
    expect(r.measurement.saturationCounts).toBe(3000);
    expect(r.measurement.maximumOpticalDepth).toBe(4);
    expect('alpha' in r.measurement).toBe(false);
    expect(r.scaleFrom).toBe('absorption frames and the cross-section');
    const given = resolveCompareMeasurement({ absorptionFrames: 'a,b', pixelSites: 1, crossSection: 0.1 }, hubbard, noSidecar).measurement;
    expect(given).toEqual({ kind: 'absorption', crossSection: 0.1, crossSectionSource: '--cross-section' });
  });
  it('asks for the cross-section when the species gives none', () => {
    expect(refusal(() => resolveCompareMeasurement({ absorptionFrames: 'a,b', pixelSites: 1 }, hubbard, noSidecar))).toMatch(/^--cross-section: .*in dimensionless mode give it in lattice spacings squared$/);
    expect(refusal(() => resolveCompareMeasurement({ absorptionFrames: 'a,b', pixelUm: 1 }, { dimensionless: false }, noSidecar))).toMatch(/^--cross-section: .*give sigma0 in µm\^2$/);
    // 174Yb is in the species table without an alkali D2 line.
    expect(refusal(() => resolveCompareMeasurement({ absorptionFrames: 'a,b', pixelUm: 1 }, { dimensionless: false, species: '174Yb' }, noSidecar))).toMatch(/^--cross-section: species: 174Yb has no alkali D2 line/);
  });
});
