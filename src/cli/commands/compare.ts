/**
 * `scatterwise compare BASE HEAD` and `scatterwise compare --changed-since REF`: fits both versions
 * of a data file and reports what changed, side by side with the deltas and the reason in words
 * for each notable change, then checks the gates. Each side is a file path or `REF:path` (read with
 * `git show`). `--changed-since REF` compares every data file of the project config that the
 * branch touched since it left REF (against their merge base), including uncommitted changes.
 *
 * Exit codes: 0 every gate passes, 1 a gate fails, 2 bad usage or input (an unknown git ref or a
 * path absent at that ref included).
 */
import { existsSync } from 'node:fs';
import * as path from 'node:path';
import { analyze } from '../../core/analyze';
import { addedFile, compareFile, comparisonSet, comparisonToJson, comparisonToMarkdown, comparisonToText, FAIL_ON_FORMS, parseFailOn, removedFile } from '../../core/compare/index';
import type { FileComparison, GateRules, SideSummary } from '../../core/compare/index';
import { configGates } from '../../core/config/index';
import { DataError } from '../../core/errors';
import { resolveOptions } from '../../core/pipeline/options';
import { memorySource, type ByteSource } from '../../core/source';
import type { FitOptions, FitReport } from '../../core/types';
import { changedSince, gitTopLevel, showFileAtRef } from '../../node/git';
import { pathInConfig, type ConfigOnDisk } from '../../node/projectConfigFile';
import type { OptionSpec, ParsedArgs } from '../args';
import { UsageError, valueOf } from '../args';
import type { Command, CommandIO } from '../command';
import { EXIT_OK } from '../command';
import { checkOutputs, openInput, writeOutput } from '../files';
import { FIT_OPTION_SPECS, fitOptionsFromArgs } from '../fitOptions';
import { asGiven } from '../namedSource';
import { CONFIG_OPTION_SPECS, loadProjectConfig, settingsFor } from '../projectOptions';

/** Exit code when a gate fails. */
export const EXIT_GATE_FAILED = 1;

export const COMPARE_FORMATS = ['text', 'markdown', 'json'] as const;
type CompareFormat = (typeof COMPARE_FORMATS)[number];

const COMPARE_SPECS: readonly OptionSpec[] = [
  { name: 'changed-since', value: 'REF', describe: 'compare every configured data file changed since the branch left REF (against the merge base)' },
  {
    name: 'fail-on',
    value: 'RULE,…',
    repeatable: true,
    check: (value) => {
      const parsed = parseFailOn([value]);
      return 'problem' in parsed ? parsed.problem : null;
    },
    describe: `gate rules: ${FAIL_ON_FORMS.join(', ')} (default: the config's gates, else class-lost and new-finding=error)`,
  },
  { name: 'format', value: 'FORMAT', values: COMPARE_FORMATS, describe: 'text (default), markdown (for a pull-request comment) or json' },
  { name: 'out', value: 'FILE', describe: 'write the comparison to FILE instead of the standard output' },
];

/** One side as given: a file on disk, or a file at a git ref. */
type Side = { kind: 'file'; path: string } | { kind: 'git'; ref: string; path: string; name: string };

/** A path that exists is a file, even with a ':' in it; otherwise `REF:path` is read from git. */
export function parseSide(argument: string, cwd: string): Side {
  const colon = argument.indexOf(':');
  const windowsDrive = /^[A-Za-z]:[\\/]/.test(argument);
  if (existsSync(path.resolve(cwd, argument)) || colon <= 0 || windowsDrive) return { kind: 'file', path: argument };
  const file = argument.slice(colon + 1);
  if (file === '') throw new UsageError(`'${argument}' names a git ref but no file: write REF:path`, 'compare');
  return { kind: 'git', ref: argument.slice(0, colon), path: file, name: argument };
}

interface AnalysedSide {
  summary: SideSummary;
  report: FitReport;
  columns: string[];
}

async function analyseSource(source: ByteSource, options: FitOptions, io: CommandIO): Promise<{ report: FitReport; columns: string[] }> {
  const { report, inspection } = await analyze(source, options, { signal: io.signal });
  return { report, columns: inspection.columns.map((c) => c.name) };
}

async function analyseSide(side: Side, options: FitOptions, io: CommandIO): Promise<AnalysedSide> {
  if (side.kind === 'git') {
    const blob = await showFileAtRef(io.cwd, side.ref, side.path, side.name);
    const { report, columns } = await analyseSource(memorySource(side.name, blob.bytes), options, io);
    return { summary: { name: side.name, commit: blob.commit }, report, columns };
  }
  const source = await openInput(io.cwd, side.path);
  try {
    const { report, columns } = await analyseSource(asGiven(source, side.path), options, io);
    return { summary: { name: side.path }, report, columns };
  } finally {
    await source.close();
  }
}

function fileRules(commandLine: GateRules | undefined, config: ConfigOnDisk | undefined, file: string, cwd: string): (GateRules | undefined)[] {
  const dataset = settingsFor(config, file, cwd, {}).dataset;
  return [commandLine, configGates(config?.config, dataset)];
}

async function compareTwo(args: ParsedArgs, io: CommandIO, config: ConfigOnDisk | undefined, rules: GateRules | undefined): Promise<FileComparison[]> {
  const [baseArgument, headArgument] = args.positionals as [string, string];
  const base = parseSide(baseArgument, io.cwd);
  const head = parseSide(headArgument, io.cwd);
  // Both sides are fitted with the head's options: the version under review decides the roles.
  const options = resolveOptions(settingsFor(config, head.path, io.cwd, fitOptionsFromArgs(args, 'compare')).options);
  const baseSide = await analyseSide(base, options, io);
  const headSide = await analyseSide(head, options, io);
  return [
    compareFile({
      base: baseSide.summary,
      head: headSide.summary,
      baseReport: baseSide.report,
      headReport: headSide.report,
      columns: { base: baseSide.columns, head: headSide.columns },
      rules: fileRules(rules, config, head.path, io.cwd),
    }),
  ];
}

async function compareChanged(ref: string, args: ParsedArgs, io: CommandIO, config: ConfigOnDisk | undefined, rules: GateRules | undefined): Promise<FileComparison[]> {
  if (!config) {
    throw new DataError('no-config', '--changed-since compares the data files a project config lists, and no scatterwise.config.json was found.', {}, 'Add a scatterwise.config.json at the repository top (or give --config), or compare two files.');
  }
  const top = await gitTopLevel(io.cwd);
  const { mergeBase, files } = await changedSince(io.cwd, ref);
  const fromCommandLine = fitOptionsFromArgs(args, 'compare');
  const results: FileComparison[] = [];
  for (const changed of files) {
    const absolute = path.join(top, ...changed.repositoryPath.split('/'));
    if (pathInConfig(config, absolute) === undefined) continue;
    const settings = settingsFor(config, absolute, io.cwd, fromCommandLine);
    if (!settings.dataset) continue;
    const options = resolveOptions(settings.options);
    const shown = path.relative(io.cwd, absolute).split(path.sep).join('/');
    const fileRuleSets = [rules, configGates(config.config, settings.dataset)];
    const baseSide = async (): Promise<AnalysedSide> => {
      const blob = await showFileAtRef(top, mergeBase, changed.repositoryPath, `${ref}:${shown}`);
      const { report, columns } = await analyseSource(memorySource(blob.name, blob.bytes), options, io);
      return { summary: { name: blob.name, commit: blob.commit }, report, columns };
    };
    if (changed.status === 'removed') {
      const base = await baseSide();
      results.push(removedFile(base.summary, base.report, fileRuleSets));
      continue;
    }
    const head = await analyseSide({ kind: 'file', path: shown }, options, io);
    if (changed.status === 'added') {
      results.push(addedFile(head.summary, head.report, fileRuleSets));
      continue;
    }
    const base = await baseSide();
    results.push(
      compareFile({
        base: base.summary,
        head: head.summary,
        baseReport: base.report,
        headReport: head.report,
        columns: { base: base.columns, head: head.columns },
        rules: fileRuleSets,
      }),
    );
  }
  return results;
}

async function runCompare(args: ParsedArgs, io: CommandIO): Promise<number> {
  const since = valueOf(args, 'changed-since');
  if (since !== undefined && args.positionals.length > 0) throw new UsageError("give either BASE and HEAD or '--changed-since REF', not both", 'compare');
  if (since === undefined && args.positionals.length !== 2) {
    throw new UsageError(`compare needs two sides, BASE and HEAD (a path or REF:path each), or '--changed-since REF' (got ${args.positionals.length} argument${args.positionals.length === 1 ? '' : 's'})`, 'compare');
  }
  const failOn = args.values.get('fail-on');
  let rules: GateRules | undefined;
  if (failOn) {
    const parsed = parseFailOn(failOn);
    if ('problem' in parsed) throw new UsageError(`'--fail-on': ${parsed.problem}`, 'compare');
    rules = parsed.rules;
  }
  const format = (valueOf(args, 'format') ?? 'text') as CompareFormat;
  const outGiven = valueOf(args, 'out');
  let outPath: string | undefined;
  if (outGiven !== undefined) {
    for (const side of args.positionals) {
      const parsed = parseSide(side, io.cwd);
      if (parsed.kind === 'file') outPath = checkOutputs(io.cwd, parsed.path, [{ option: 'out', path: outGiven }])[0];
    }
    outPath ??= path.resolve(io.cwd, outGiven);
  }
  const config = loadProjectConfig(args, io, 'compare');
  const files = since !== undefined ? await compareChanged(since, args, io, config, rules) : await compareTwo(args, io, config, rules);
  const set = comparisonSet(files);
  const text = format === 'json' ? comparisonToJson(set) : format === 'markdown' ? comparisonToMarkdown(set) : comparisonToText(set);
  if (outPath !== undefined && since !== undefined) {
    for (const file of files) if (file.status !== 'removed') checkOutputs(io.cwd, file.head.name, [{ option: 'out', path: outPath }]);
  }
  writeOutput(io, outPath, text);
  return set.passed ? EXIT_OK : EXIT_GATE_FAILED;
}

export const compareCommand: Command = {
  name: 'compare',
  summary: 'compare two versions of a data file (paths or REF:path), report the changes and check the gates',
  usage: 'compare BASE HEAD | compare --changed-since REF  [--fail-on RULE,…] [--format text|markdown|json] [options]',
  description: [
    'Fits both versions of a data file and reports, side by side, what changed: rows, classes gained or lost,',
    'columns added or removed, eigenvalues and explained ratios, cross-validated accuracy, per-class recall,',
    'findings new and resolved, with the likely reason for each notable change. BASE and HEAD are each a file',
    'path or REF:path (the file as it was at a branch, tag or commit). --changed-since REF compares every data',
    "file of the project config that changed since the branch left REF. Both sides use the head's options.",
    '',
    'Gates (--fail-on, or `gates` in the config): min-accuracy=0.9 (cross-validated), accuracy-drop=0.02,',
    'new-finding=warning, class-lost, or none. Without any, a class disappearing and a new error finding fail.',
    'Exit codes: 0 all gates pass, 1 a gate fails, 2 bad usage or input (unknown ref or path included).',
  ].join('\n'),
  options: [...FIT_OPTION_SPECS, ...CONFIG_OPTION_SPECS, ...COMPARE_SPECS],
  run: runCompare,
};
