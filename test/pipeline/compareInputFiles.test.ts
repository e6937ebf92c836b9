// The files a compare run reads (src/pipeline/compareInputFiles.ts), from the option text
// alone: the file of an HDF5 dataset address (file.h5:/atoms), comma-separated lists, the
// shot files of --shots instead of the frame names inside them, the region mask; the
// expected lists are written out by hand.
// Mutation tried: taking --image also with --shots: the --shots case lists the frame index "0" and fails.
import { describe, expect, it } from 'vitest';
import { compareInputFiles, sourceFiles } from '../../src/pipeline/compareInputFiles.js';

describe('compare input files', () => {
  it('names the file of each source', () => {
    expect(sourceFiles(undefined)).toEqual([]);
    expect(sourceFiles('run7.h5:/shot/atoms')).toEqual(['run7.h5']);
    expect(sourceFiles('a.tif,b.tif')).toEqual(['a.tif', 'b.tif']);
  });

  it('lists the scenario, the measured files and the region mask', () => {
    expect(compareInputFiles('s.json', { image: 'pic.npy', backgroundFrame: 'bg.npy', regionMask: 'mask.png' })).toEqual(['s.json', 'pic.npy', 'bg.npy', 'mask.png']);
    expect(compareInputFiles('s.json', { absorptionFrames: 'atoms.tif,probe.tif,dark.tif' })).toEqual(['s.json', 'atoms.tif', 'probe.tif', 'dark.tif']);
    // with --shots, --image names frames inside each shot file, not files
    expect(compareInputFiles('s.json', { shots: 'day1/', image: '0' })).toEqual(['s.json', 'day1/']);
  });
});
