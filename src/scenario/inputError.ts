// Errors that the command line maps to exit codes (see DESIGN.md section 6):
// InputError -> 2 (bad input; the message names the field and what to change).

export class InputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'InputError';
  }
}

/** Exit codes shared by every command. */
export const ExitCode = {
  done: 0,
  failure: 1,
  badInput: 2,
  notConverged: 3,
  interrupted: 130,
} as const;
