/**
 * `scatterwise script FILE --lang python|r|sql`: a script that reproduces the fit of FILE (Python:
 * pandas + scikit-learn; R: base R + MASS), carrying the options, the file's SHA-256 and the
 * expected figures, and checking them with `--check`; or a SQL query that computes the per-class
 * moments of a table with FILE's columns inside a database (`--dialect`, `--table`), to be fitted
 * with `scatterwise fit --moments RESULT.csv`. Written to stdout or `--out`; FILE is only read.
 */
import { resolve } from 'node:path';
import { version } from '../../../package.json';
import { analyze, resolveOptions } from '../../core/analyze';
import { momentsQueryForTable, reproductionScript, SCRIPT_LANGUAGES, shiftsFromMoments, SQL_DIALECTS, type ScriptLanguage, type SqlDialect } from '../../core/scripts/index';
import { tableMoments } from '../../core/tableMoments';
import { fileSha256 } from '../../node/fileSha256';
import type { OptionSpec, ParsedArgs } from '../args';
import { UsageError, valueOf } from '../args';
import type { Command, CommandIO } from '../command';
import { EXIT_OK } from '../command';
import { checkOutputs, openInput, writeOutput } from '../files';
import { FIT_OPTION_SPECS, fitOptionsFromArgs } from '../fitOptions';
import { CONFIG_OPTION_SPECS, fileOptions } from '../projectOptions';

const SCRIPT_SPECS: readonly OptionSpec[] = [
  { name: 'lang', value: 'LANG', values: SCRIPT_LANGUAGES, describe: 'python (pandas + scikit-learn), r (base R + MASS) or sql (a per-class moments query)' },
  { name: 'dialect', value: 'DIALECT', values: SQL_DIALECTS, describe: 'SQL only: identifier and string quoting of this engine (default ansi)' },
  { name: 'table', value: 'NAME', describe: "SQL only: the table to read (default: FILE's name without its extension)" },
  { name: 'schema', value: 'NAME', describe: 'SQL only: the schema that holds the table' },
  { name: 'out', value: 'FILE', describe: 'write the script to FILE instead of the standard output' },
];

const SQL_ONLY = ['dialect', 'table', 'schema'];

/** FILE's base name without its extension: the default table name. */
function tableName(path: string): string {
  const base = path.split(/[\\/]/).pop() ?? path;
  const dot = base.lastIndexOf('.');
  return dot > 0 ? base.slice(0, dot) : base;
}

async function runScript(args: ParsedArgs, io: CommandIO): Promise<number> {
  if (args.positionals.length !== 1) {
    throw new UsageError(args.positionals.length === 0 ? 'script needs the data file to reproduce' : `script takes one data file (got ${args.positionals.length})`, 'script');
  }
  const language = valueOf(args, 'lang') as ScriptLanguage | undefined;
  if (language === undefined) throw new UsageError(`script needs --lang (${SCRIPT_LANGUAGES.join(', ')})`, 'script');
  if (language !== 'sql') {
    const stray = SQL_ONLY.find((name) => args.values.has(name));
    if (stray) throw new UsageError(`--${stray} applies to --lang sql only`, 'script');
  }
  const input = args.positionals[0]!;
  const options = resolveOptions(fileOptions(args, io, 'script', input, fitOptionsFromArgs(args, 'script')));
  const outArg = valueOf(args, 'out');
  const [outPath] = outArg !== undefined ? checkOutputs(io.cwd, input, [{ option: 'out', path: outArg }]) : [];
  const generator = `scatterwise ${version}`;
  const fullPath = resolve(io.cwd, input);

  const source = await openInput(io.cwd, input);
  let text: string;
  try {
    if (language === 'sql') {
      const { moments, label } = await tableMoments(source, options, { signal: io.signal });
      const sha256 = await fileSha256(fullPath);
      text = momentsQueryForTable(label, moments.features, shiftsFromMoments(moments, moments.features), {
        dialect: (valueOf(args, 'dialect') ?? 'ansi') as SqlDialect,
        table: valueOf(args, 'table') ?? tableName(input),
        ...(valueOf(args, 'schema') !== undefined ? { schema: valueOf(args, 'schema')! } : {}),
        generator,
        fileDescription: `${source.name} (SHA-256 ${sha256})`,
      });
    } else {
      const [{ report, inspection }, sha256] = await Promise.all([analyze(source, options, { signal: io.signal }), fileSha256(fullPath)]);
      text = reproductionScript(language, { ...report, source: { ...report.source, sha256 } }, inspection, generator, fullPath);
    }
  } finally {
    await source.close();
  }
  writeOutput(io, outPath, text);
  return EXIT_OK;
}

export const scriptCommand: Command = {
  name: 'script',
  summary: 'write a Python or R script that reproduces and checks a fit, or a SQL query for per-class moments',
  usage: 'script FILE --lang python|r|sql [options]',
  description: [
    'python and r: fits FILE, then writes a script that reads the same file, selects the same columns and',
    'rows, fits the same solver, shrinkage and priors, reproduces the same cross-validation folds and prints',
    'the key figures as JSON. The script carries the options, the SHA-256 of FILE and the expected figures;',
    'run it with --check to recompute and exit 1 with a list of differences beyond its stated tolerance.',
    'sql: writes a query computing per-class counts, sums and shifted cross-products from a table with the',
    "columns of FILE (quoted for --dialect); fit its result with 'scatterwise fit --moments RESULT.csv'.",
    'Options come from the project config (scatterwise.config.json) for FILE, with those given here on top.',
    'FILE is only read.',
  ].join('\n'),
  options: [...FIT_OPTION_SPECS, ...CONFIG_OPTION_SPECS, ...SCRIPT_SPECS],
  run: runScript,
};
