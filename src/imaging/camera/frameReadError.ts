// The one error type of every frame reader: it names the file (as the user gave it) and says
// what is wrong with it in our words, never in the words of the library or the runtime that
// tripped over it ("offset outside the bounds"). The command line maps it to bad input (exit 2).

export type FrameReadProblem =
  | 'unknown-format'
  | 'damaged'
  | 'truncated'
  | 'unsupported'
  | 'not-an-image'
  | 'dataset-missing'
  | 'inconsistent-frames';

export class FrameReadError extends Error {
  /** The file name as given (with the HDF5 dataset address when there is one). */
  readonly fileName: string;
  readonly problem: FrameReadProblem;

  constructor(fileName: string, problem: FrameReadProblem, message: string) {
    super(`${fileName}: ${message}`);
    this.name = 'FrameReadError';
    this.fileName = fileName;
    this.problem = problem;
  }
}
