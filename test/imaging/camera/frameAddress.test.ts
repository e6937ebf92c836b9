// Direct test of src/imaging/camera/frameAddress.ts: the HDF5 split (also tested through the
// readers in readFrames.test.ts) and the short name of a source text shown in titles and on
// stdout: every comma-separated item's base name, in the order given.
import { describe, expect, it } from 'vitest';
import { parseFrameAddress, sourceAddresses, sourceShortName } from '../../../src/imaging/camera/frameAddress.js';

describe('frame addresses', () => {
  it('splits an HDF5 dataset path and leaves other colons alone', () => {
    expect(parseFrameAddress('shots/run7.h5:/shot/atoms')).toEqual({ file: 'shots/run7.h5', dataset: '/shot/atoms' });
    expect(parseFrameAddress('C:/data/atoms.tif')).toEqual({ file: 'C:/data/atoms.tif' });
  });

  it('splits a source text into its addresses', () => {
    expect(sourceAddresses(' a.tif, ,b.h5:/x ')).toEqual([{ file: 'a.tif' }, { file: 'b.h5', dataset: '/x' }]);
  });

  it('names a source by the base names of its items', () => {
    expect(sourceShortName('data/run7/atoms.tif')).toBe('atoms.tif');
    expect(sourceShortName('run7/atoms.npy, run7/probe.npy,run7/dark.npy')).toBe('atoms.npy, probe.npy, dark.npy');
    expect(sourceShortName('C:\\lab\\frames\\a.fits')).toBe('a.fits');
    expect(sourceShortName('shots/')).toBe('shots');
    // an HDF5 dataset keeps its path beside the file's name
    expect(sourceShortName('data/run7.h5:/shot/atoms,data/run7.h5:/shot/probe')).toBe('run7.h5:/shot/atoms, run7.h5:/shot/probe');
  });
});
