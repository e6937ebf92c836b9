// Camera data as the lab records it: readers, absorption and fluorescence imaging, image
// clean-up and geometry, shot stacks, and the physics read off the images. Re-exports only.

export * from './pixelImage.js';
export * from './frameStack.js';
export * from './frameReadError.js';
export * from './frameAddress.js';
export { readFrames, detectFrameFormat, type ReadFramesOptions } from './readFrames.js';
export { readTiffFrames } from './readTiff.js';
export { readHdf5Frames, hasHdf5Signature } from './readHdf5Frames.js';
export { readFitsFrames } from './readFits.js';
export { readNpyFrames, parseNpyHeader, type NpyHeader } from './readNpyFrames.js';
export { readPngFrame } from './readPngFrame.js';
export * from './resonantCrossSection.js';
export * from './absorptionImage.js';
export * from './fluorescenceImage.js';
export * from './regionOfInterest.js';
export * from './hotPixels.js';
export * from './backgroundPlane.js';
export * from './shotStack.js';
export * from './imageGeometry.js';
export * from './frameOrientation.js';
export * from './azimuthalAverage.js';
export * from './abelInversion.js';
export * from './localDensityEquationOfState.js';
export * from './fluctuationThermometry.js';
