import type { Command } from 'commander';
import { registerRender } from './render.js';
import { registerRisk } from './risk.js';
import { registerServe } from './serve.js';
import { registerSign } from './sign.js';
import { registerWarm } from './warm.js';

/** Every subcommand, in the order `foldwise --help` lists them. */
export function registerCommands(program: Command): void {
  registerServe(program);
  registerRender(program);
  registerRisk(program);
  registerWarm(program);
  registerSign(program);
}
