// `tiercake hubbard`: registered once the physics module lands.
import type { Command } from 'commander';
import type { CommandContext } from './main.js';

export function registerHubbard(program: Command, context: CommandContext): void {
  void program;
  void context;
}
