/**
 * `scatterwise report FILE…`: the reviewer's report of one or more data files — verdict, classes,
 * key statistics, top features, confusion matrix, findings, cautions — as Markdown (default),
 * JSON or one self-contained HTML page; `--plots DIR` also writes each file's plots as SVG files
 * (and the Markdown links them). Options come from the project config, with the command line's on
 * top. Data files are only read.
 */
import { mkdirSync, statSync } from 'node:fs';
import * as path from 'node:path';
import { analyze } from '../../core/analyze';
import { toHtml } from '../../core/format/html';
import { CAUTIONS, toMarkdown } from '../../core/format/markdown';
import { reportPlots } from '../../core/format/svgPlots';
import { resolveOptions } from '../../core/pipeline/options';
import type { FitReport } from '../../core/types';
import { DataError } from '../../core/errors';
import { asGiven } from '../namedSource';
import type { OptionSpec, ParsedArgs } from '../args';
import { UsageError, valueOf } from '../args';
import type { Command, CommandIO } from '../command';
import { EXIT_OK } from '../command';
import { checkOutputs, openInput, writeOutput, writeWholeFile } from '../files';
import { FIT_OPTION_SPECS, fitOptionsFromArgs } from '../fitOptions';
import { CONFIG_OPTION_SPECS, loadProjectConfig, settingsFor } from '../projectOptions';

export const REPORT_PAGE_FORMATS = ['markdown', 'json', 'html'] as const;
type PageFormat = (typeof REPORT_PAGE_FORMATS)[number];

const OUTPUT_SPECS: readonly OptionSpec[] = [
  { name: 'format', value: 'FORMAT', values: REPORT_PAGE_FORMATS, describe: 'markdown (default), json, or html (one self-contained page, plots inline)' },
  { name: 'plots', value: 'DIR', describe: 'also write each file’s plots as SVG files into DIR (created if needed)' },
  { name: 'out', value: 'FILE', describe: 'write the report to FILE instead of the standard output' },
];

/** `data/pump-faults.csv` → `pump-faults`, made safe and unique among the files of this run. */
function plotStems(inputs: readonly string[]): string[] {
  const stems = inputs.map((input) => path.basename(input).replace(/\.[^.]*$/, '').replace(/[^\w.-]+/g, '_') || 'data');
  return stems.map((stem, i) => (stems.indexOf(stem) !== i || stems.lastIndexOf(stem) !== i ? `${stem}-${i + 1}` : stem));
}

/** A link target in Markdown: a relative path with `/`, each segment percent-encoded. */
function markdownLink(fromFolder: string, file: string): string {
  return path.relative(fromFolder, file).split(path.sep).map(encodeURIComponent).join('/');
}

function plotsFolder(cwd: string, given: string): string {
  const folder = path.resolve(cwd, given);
  try {
    mkdirSync(folder, { recursive: true });
    if (!statSync(folder).isDirectory()) throw new Error('not a folder');
  } catch (error) {
    throw new DataError('unwritable-output', `--plots ${given}: cannot be used as a folder (${(error as NodeJS.ErrnoException).code ?? (error as Error).message}).`, { file: given }, 'Give a folder you may write to.');
  }
  return folder;
}

function pageMarkdown(reports: readonly FitReport[], plotLinks: readonly { title: string; link: string }[][]): string {
  const parts: string[] = [];
  if (reports.length > 1) parts.push(`# Scatterwise report of ${reports.length} data files\n`);
  reports.forEach((report, i) => {
    parts.push(toMarkdown(report, { cautions: false }));
    const links = plotLinks[i] ?? [];
    if (links.length > 0) {
      parts.push('### Plots\n');
      parts.push(`${links.map((l) => `![${l.title}](${l.link})`).join('\n')}\n`);
    }
  });
  parts.push('### Cautions\n');
  parts.push(`${CAUTIONS.map((c) => `- ${c}`).join('\n')}\n`);
  return parts.join('\n');
}

async function runReport(args: ParsedArgs, io: CommandIO): Promise<number> {
  const inputs = args.positionals;
  if (inputs.length === 0) throw new UsageError('report needs at least one data file', 'report');
  const format = (valueOf(args, 'format') ?? 'markdown') as PageFormat;
  const config = loadProjectConfig(args, io, 'report');
  const fromCommandLine = fitOptionsFromArgs(args, 'report');
  const outGiven = valueOf(args, 'out');
  const plotsGiven = valueOf(args, 'plots');
  let outPath: string | undefined;
  if (outGiven !== undefined) for (const input of inputs) outPath = checkOutputs(io.cwd, input, [{ option: 'out', path: outGiven }])[0];
  // Every option is checked before the first byte is read.
  const settings = inputs.map((input) => {
    const { options } = settingsFor(config, input, io.cwd, fromCommandLine);
    return resolveOptions(options);
  });
  const folder = plotsGiven === undefined ? undefined : plotsFolder(io.cwd, plotsGiven);
  const stems = plotStems(inputs);

  const reports: FitReport[] = [];
  for (const [i, input] of inputs.entries()) {
    const source = await openInput(io.cwd, input);
    try {
      reports.push((await analyze(asGiven(source, input), settings[i], { signal: io.signal })).report);
    } finally {
      await source.close();
    }
  }

  const links: { title: string; link: string }[][] = reports.map(() => []);
  if (folder !== undefined) {
    const linkFrom = outPath !== undefined ? path.dirname(outPath) : io.cwd;
    reports.forEach((report, i) => {
      for (const plot of reportPlots(report)) {
        const target = path.join(folder, `${stems[i]}-${plot.id}.svg`);
        for (const input of inputs) checkOutputs(io.cwd, input, [{ option: 'plots', path: target }]);
        writeWholeFile(target, plot.svg);
        links[i]!.push({ title: plot.title, link: markdownLink(linkFrom, target) });
      }
    });
  }

  const text =
    format === 'json'
      ? `${JSON.stringify({ version: 1, reports }, null, 2)}\n`
      : format === 'html'
        ? toHtml(reports, reports.length === 1 ? `Scatterwise report: ${reports[0]!.source.name}` : `Scatterwise report of ${reports.length} data files`)
        : pageMarkdown(reports, links);
  writeOutput(io, outPath, text);
  return EXIT_OK;
}

export const reportCommand: Command = {
  name: 'report',
  summary: 'a one-screen report of data files for a reviewer: Markdown, JSON or self-contained HTML, SVG plots',
  usage: 'report FILE… [--format markdown|json|html] [--plots DIR] [options]',
  description: [
    'Analyses each FILE (CSV, TSV or Parquet) as `fit` does and writes what a reviewer needs on one screen:',
    'the verdict, the classes, the key statistics, the top features, the confusion matrix and the findings,',
    'closing with the cautions. Options come from the project config (scatterwise.config.json) for files it',
    'lists; options given here win. The HTML form is one page with the plots inline and needs no network.',
    'Data files are only read.',
  ].join('\n'),
  options: [...FIT_OPTION_SPECS, ...CONFIG_OPTION_SPECS, ...OUTPUT_SPECS],
  run: runReport,
};
