/**
 * Every subcommand of `scatterwise`, in the order the help lists them. A new subcommand is one file
 * in this folder exporting a `Command`, plus one line here.
 */
import type { Command } from '../command';
import { compareCommand } from './compare';
import { fitCommand } from './fit';
import { momentsCommand } from './moments';
import { reportCommand } from './report';
import { scriptCommand } from './script';

export const COMMANDS: readonly Command[] = [fitCommand, reportCommand, compareCommand, scriptCommand, momentsCommand];
