/**
 * Every subcommand of `scatterwise`, in the order the help lists them. A new subcommand is one file
 * in this folder exporting a `Command`, plus one line here.
 */
import type { Command } from '../command';
import { fitCommand } from './fit';
import { momentsCommand } from './moments';
import { scriptCommand } from './script';

export const COMMANDS: readonly Command[] = [fitCommand, scriptCommand, momentsCommand];
