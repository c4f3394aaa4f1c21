/**
 * `scatterwise moments FILE --out PART.json`: the per-class moments of FILE (same column roles and
 * row screening as `fit`) as JSON, so a table split across machines or engines can be fitted as one:
 * `scatterwise fit --moments PART1.json PART2.json …` merges the parts exactly (also with the CSV
 * results of the SQL moments query) and reports everything that does not need the rows.
 */
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { DataError } from '../../core/errors';
import { momentsToJSON } from '../../core/moments';
import { fitFromMoments } from '../../core/momentsFit';
import { momentsFitMarkdown, momentsFitText } from '../../core/momentsFitText';
import { readMomentsInputs, type MomentsInput } from '../../core/momentsIO';
import { resolveOptions } from '../../core/pipeline/options';
import { tableMoments } from '../../core/tableMoments';
import type { OptionSpec, ParsedArgs } from '../args';
import { UsageError, valueOf } from '../args';
import type { Command, CommandIO } from '../command';
import { EXIT_OK } from '../command';
import { checkOutputs, openInput, writeOutput } from '../files';
import { FIT_OPTION_SPECS, fitOptionsFromArgs } from '../fitOptions';
import { CONFIG_OPTION_SPECS, fileOptions } from '../projectOptions';
import type { ReportFormat } from './fit';

/** The fit options that shape moments: roles, missing values, reading. */
const MOMENT_OPTION_NAMES = new Set(['label', 'features', 'exclude', 'missing', 'delimiter', 'no-header', 'skip-ragged-rows']);

async function runMoments(args: ParsedArgs, io: CommandIO): Promise<number> {
  if (args.positionals.length !== 1) {
    throw new UsageError(args.positionals.length === 0 ? 'moments needs the data file' : `moments takes one data file (got ${args.positionals.length})`, 'moments');
  }
  const input = args.positionals[0]!;
  const options = resolveOptions(fileOptions(args, io, 'moments', input, fitOptionsFromArgs(args, 'moments')));
  const outArg = valueOf(args, 'out');
  const [outPath] = outArg !== undefined ? checkOutputs(io.cwd, input, [{ option: 'out', path: outArg }]) : [];
  const source = await openInput(io.cwd, input);
  try {
    const { moments, label } = await tableMoments(source, options, { signal: io.signal });
    writeOutput(io, outPath, `${JSON.stringify({ ...momentsToJSON(moments), label }, null, 1)}\n`);
  } finally {
    await source.close();
  }
  return EXIT_OK;
}

/**
 * `fit --moments FILE…`: the positionals are moments (JSON parts and/or CSV results of the SQL
 * query, merged in order). Called by the fit command when `--moments` is given.
 */
export async function runFitFromMoments(args: ParsedArgs, io: CommandIO, format: ReportFormat, outArg: string | undefined): Promise<number> {
  if (args.positionals.length === 0) throw new UsageError('fit --moments needs at least one moments file', 'fit');
  if (args.values.has('scores')) throw new UsageError('--scores needs the rows; it cannot be used with --moments', 'fit');
  const inputs: MomentsInput[] = args.positionals.map((path) => {
    try {
      return { name: path, text: readFileSync(resolve(io.cwd, path), 'utf8') };
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      throw new DataError('unreadable-file', `${path}: ${code === 'ENOENT' ? 'no such file' : `cannot be read (${code ?? String(error)})`}.`, { file: path }, 'Check the path and that you may read the file.');
    }
  });
  const [outPath] = outArg !== undefined ? checkOutputs(io.cwd, args.positionals[0]!, [{ option: 'out', path: outArg }]) : [];
  if (outPath !== undefined) for (const path of args.positionals.slice(1)) checkOutputs(io.cwd, path, [{ option: 'out', path: outArg! }]);
  const { moments, label } = readMomentsInputs(inputs);
  const bytes = inputs.reduce((sum, i) => sum + Buffer.byteLength(i.text), 0);
  const report = fitFromMoments(moments, args.positionals.join(' + '), fitOptionsFromArgs(args, 'fit'), bytes, label);
  const text = format === 'json' ? `${JSON.stringify(report, null, 2)}\n` : format === 'markdown' ? momentsFitMarkdown(report) : momentsFitText(report);
  writeOutput(io, outPath, text);
  return EXIT_OK;
}

export const momentsCommand: Command = {
  name: 'moments',
  summary: 'write the per-class moments of a table as JSON, to fit shards together with fit --moments',
  usage: 'moments FILE [--out PART.json] [options]',
  description: [
    'Reads FILE once and writes, per class, the row count, means, centred cross-products, minima, maxima',
    'and the third- and fourth-order terms the shrinkage needs, as JSON. Parts of one table computed on',
    "different machines merge exactly: 'scatterwise fit --moments PART1.json PART2.json …' gives the",
    'figures of fitting the whole table, except those that need the rows (accuracy, confusion, plots).',
    'Options come from the project config (scatterwise.config.json) for FILE, with those given here on top.',
  ].join('\n'),
  options: [
    ...FIT_OPTION_SPECS.filter((s) => MOMENT_OPTION_NAMES.has(s.name)),
    ...CONFIG_OPTION_SPECS,
    { name: 'out', value: 'FILE', describe: 'write the moments to FILE instead of the standard output' },
  ],
  run: runMoments,
};
