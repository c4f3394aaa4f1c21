/**
 * `scatterwise fit FILE`: the whole analysis of one table, written as JSON (the FitReport
 * contract), Markdown or text, to stdout or `--out`; `--scores` adds the discriminant scores of
 * every row. Options come from the project config for the file (as for `report` and `compare`, and
 * as the editor fits it), with the command line's on top. The data file is opened read-only and no
 * output may name it.
 */
import { resolve } from 'node:path';
import { analyze } from '../../core/analyze';
import { jsonPieces } from '../../core/format/jsonPieces';
import { toMarkdown } from '../../core/format/markdown';
import { toText } from '../../core/format/text';
import { resolveOptions } from '../../core/pipeline/options';
import type { FitReport } from '../../core/types';
import type { OptionSpec, ParsedArgs } from '../args';
import { UsageError, valueOf } from '../args';
import type { Command, CommandIO } from '../command';
import { EXIT_OK } from '../command';
import { checkOutputs, openInput, writeOutput } from '../files';
import { FIT_OPTION_SPECS, fitOptionsFromArgs } from '../fitOptions';
import { createParallelScanner } from '../../node/parallelScan';
import { CONFIG_OPTION_SPECS, fileOptions } from '../projectOptions';
import { keepYoungGenerationSmall } from '../youngGeneration';
import { ScoresFile } from '../scoresFile';
import { runFitFromMoments } from './moments';

export const REPORT_FORMATS = ['text', 'markdown', 'json'] as const;
export type ReportFormat = (typeof REPORT_FORMATS)[number];

const OUTPUT_SPECS: readonly OptionSpec[] = [
  { name: 'format', value: 'FORMAT', values: REPORT_FORMATS, describe: 'report format (default text)' },
  { name: 'out', value: 'FILE', describe: 'write the report to FILE instead of the standard output' },
  { name: 'scores', value: 'FILE', describe: 'write a CSV of discriminant scores LD1..LDk, one line per data row (empty for dropped rows)' },
  {
    name: 'workers',
    value: 'N',
    check: (value) => (/^[1-9][0-9]*$/.test(value) ? null : 'a whole number of at least 1'),
    describe: 'threads reading the rows of a large CSV, TSV or Parquet file (default: one per core; 1 reads in this thread)',
  },
  { name: 'moments', describe: 'the FILEs are per-class moments (JSON from `scatterwise moments`, or CSV results of the SQL moments query), merged and fitted without the rows' },
];

/** The report as text, Markdown or JSON, in pieces: the JSON of a large plot sample is never one string. */
export function* renderReport(report: FitReport, format: ReportFormat): Generator<string> {
  if (format === 'json') {
    yield* jsonPieces(report);
    yield '\n';
  } else yield format === 'markdown' ? toMarkdown(report) : toText(report);
}

async function runFit(args: ParsedArgs, io: CommandIO): Promise<number> {
  if (args.flags.has('moments')) return runFitFromMoments(args, io, (valueOf(args, 'format') ?? 'text') as ReportFormat, valueOf(args, 'out'));
  if (args.positionals.length !== 1) {
    throw new UsageError(args.positionals.length === 0 ? 'fit needs the data file to analyse' : `fit takes one data file (got ${args.positionals.length}: ${args.positionals.join(' ')})`, 'fit');
  }
  const input = args.positionals[0]!;
  const options = resolveOptions(fileOptions(args, io, 'fit', input, fitOptionsFromArgs(args, 'fit')));
  const format = (valueOf(args, 'format') ?? 'text') as ReportFormat;
  const outputs = [
    { option: 'out', path: valueOf(args, 'out') },
    { option: 'scores', path: valueOf(args, 'scores') },
  ].filter((o): o is { option: string; path: string } => o.path !== undefined);
  const [outPath, scoresPath] = ((): [string | undefined, string | undefined] => {
    const resolved = checkOutputs(io.cwd, input, outputs);
    const at = (option: string): string | undefined => {
      const i = outputs.findIndex((o) => o.option === option);
      return i < 0 ? undefined : resolved[i];
    };
    return [at('out'), at('scores')];
  })();

  const source = await openInput(io.cwd, input);
  const scores = scoresPath !== undefined ? new ScoresFile(scoresPath) : undefined;
  const workers = Number(valueOf(args, 'workers') ?? 0) || undefined;
  // Large splittable text is read by several threads; the report is the same (core/parallel).
  const scanner = workers === 1 ? undefined : createParallelScanner(resolve(io.cwd, input), source.name, { ...(workers ? { workers } : {}), onWorkerOnline: keepYoungGenerationSmall });
  try {
    const { report } = await analyze(source, options, {
      signal: io.signal,
      ...(scores ? { onScores: (batch) => scores.add(batch) } : {}),
      ...(scanner ? { scanner } : {}),
    });
    scores?.finish(report.rows.total, report.discriminant.eigenvalues.length);
    writeOutput(io, outPath, renderReport(report, format));
    return EXIT_OK;
  } catch (error) {
    scores?.discard();
    throw error;
  } finally {
    await scanner?.close();
    await source.close();
  }
}

export const fitCommand: Command = {
  name: 'fit',
  summary: 'analyse a labelled table: LDA beside PCA, separability tests, cross-validated accuracy, findings',
  usage: 'fit FILE [options]',
  description: [
    'Reads FILE (CSV, TSV or Parquet) in two streaming passes and reports how well its classes separate:',
    'the linear discriminants (Fisher LDA) and principal components, Wilks, Pillai, Hotelling–Lawley and',
    "Roy tests, Bartlett's tests of each discriminant, Box's M, univariate F per feature, training and",
    'cross-validated accuracy with confusion matrices, and data-quality findings. FILE is never written.',
    'Options come from the project config (scatterwise.config.json) for FILE, with those given here on top.',
    '',
    'JSON follows the FitReport contract (src/core/types.ts); a figure that cannot be computed (NaN, e.g.',
    'a test without degrees of freedom) or is infinite (F of a feature constant within classes) is null.',
  ].join('\n'),
  options: [...FIT_OPTION_SPECS, ...CONFIG_OPTION_SPECS, ...OUTPUT_SPECS],
  run: runFit,
};
