// Where frames come from, as a user writes it: a file name, or for HDF5 a file name and a
// dataset path joined by a colon, `shots/run7.h5:/shot/atoms` (the path starts with '/').
// The split is made at the first ':' that follows an HDF5 file extension (.h5, .hdf5, .hdf,
// .he5, .nxs, .nx5), so Windows drive letters and colons elsewhere in a path are left alone.

export interface FrameAddress {
  /** The file to read (as given, not resolved). */
  file: string;
  /** The HDF5 dataset path inside the file, when one was given. */
  dataset?: string;
}

const hdf5Extension = /\.(h5|hdf5|hdf|he5|nxs|nx5):(?=\/)/i;

/** Split `file.h5:/group/name` into file and dataset; any other text is a plain file name. */
export function parseFrameAddress(text: string): FrameAddress {
  const m = hdf5Extension.exec(text);
  if (m === null) return { file: text };
  const cut = m.index + m[0].length - 1; // position of ':'
  const dataset = text.slice(cut + 1);
  return dataset.length > 1 ? { file: text.slice(0, cut), dataset } : { file: text.slice(0, cut) };
}

/** The frame addresses of a source text as given: its comma-separated items, empty ones left out. */
export function sourceAddresses(text: string): FrameAddress[] {
  return text
    .split(',')
    .map((item) => item.trim())
    .filter((item) => item.length > 0)
    .map(parseFrameAddress);
}

/**
 * The short name of a measured source as given (--image, --absorption-frames or --shots):
 * each item's file base name (with its HDF5 dataset path), in order, so raw absorption frames
 * read "atoms.npy, probe.npy" (the frames with atoms first) rather than the last path's name.
 */
export function sourceShortName(text: string): string {
  return sourceAddresses(text)
    .map(({ file, dataset }) => {
      const parts = file.split(/[\\/]/);
      const last = parts[parts.length - 1];
      // A folder given with a trailing slash keeps its own name.
      const name = last !== undefined && last.length > 0 ? last : (parts[parts.length - 2] ?? file);
      return dataset !== undefined ? `${name}:${dataset}` : name;
    })
    .join(', ');
}
