// Runs before every test file: TIERCAKE_KERNEL=js (or wasm) sets the kernel of every
// executor created without an explicit choice, so the whole suite can run on either path
// (the command line reads the same variable in the child processes).
import { parseKernelChoice, setDefaultKernelChoice } from '../src/solver/kernel/sweepKernels.js';

const choice = process.env.TIERCAKE_KERNEL;
if (choice !== undefined && choice !== '') setDefaultKernelChoice(parseKernelChoice(choice, 'TIERCAKE_KERNEL'));
