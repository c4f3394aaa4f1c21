/**
 * The project config (`scatterwise.config.json` at the workspace root): which data files the
 * project has, their column roles and fit options, and the gates of `scatterwise compare`. Its
 * schema is `schemas/scatterwise.schema.json`, the same file VS Code validates the config with.
 *
 * A data file takes the settings of the first dataset whose `files` globs match its path relative
 * to the config's folder. Options given on the command line win over the config.
 */
import schema from '../../../schemas/scatterwise.schema.json';
import type { GateRules } from '../compare/gateRules';
import { DataError } from '../errors';
import type { CvMethod, FitOptions, MissingPolicy, PcaScale, Priors, Solver } from '../types';
import { globMatches, globProblem } from './glob';
import { describePath, parseJsonWithPositions, pathKey } from './jsonText';
import type { JsonPath } from './jsonText';
import { assertSupportedSchema, checkAgainstSchema, describeProblem, type JsonSchema } from './schemaCheck';

/** The config's file name, looked for at the workspace root (and by the CLI in the current folder and its parents). */
export const CONFIG_FILE_NAME = 'scatterwise.config.json';
/** Where the schema lives in the repository, relative to the root; the sample config points at it. */
export const SCHEMA_FILE = 'schemas/scatterwise.schema.json';

export const PROJECT_SCHEMA = schema as JsonSchema;
assertSupportedSchema(PROJECT_SCHEMA);

export interface DatasetConfig {
  files: string[];
  label?: string;
  features?: string[];
  exclude?: string[];
  missing?: MissingPolicy;
  solver?: Solver;
  priors?: Priors;
  cv?: CvMethod;
  seed?: number;
  pca?: PcaScale;
  delimiter?: string;
  header?: boolean;
  skipRaggedRows?: boolean;
  gates?: GateRules;
}

export interface ProjectConfig {
  datasets: DatasetConfig[];
  gates?: GateRules;
}

/** A config as read from a file: its content and where it came from. */
export interface LoadedConfig {
  config: ProjectConfig;
  /** The file it was read from, as it should be named in messages. */
  fileName: string;
}

/**
 * Reads a config's text: JSON syntax, then the schema, then the globs. Every problem found is
 * listed in one DataError (code `bad-config`), each with its line, column and key path.
 */
export function parseProjectConfig(text: string, fileName: string): ProjectConfig {
  const { value, positions } = parseJsonWithPositions(text, fileName);
  const at = (path: JsonPath): string => {
    const position = positions.get(pathKey(path));
    return position ? `line ${position.line}, column ${position.column}: ` : '';
  };
  const schemaProblems = checkAgainstSchema(value, PROJECT_SCHEMA);
  const problems = schemaProblems.map((problem) => `${at(problem.path)}${describeProblem(problem)}`);
  let firstLine = schemaProblems.length > 0 ? positions.get(pathKey(schemaProblems[0]!.path))?.line : undefined;
  if (problems.length === 0) {
    (value as ProjectConfig).datasets.forEach((dataset, i) =>
      dataset.files.forEach((pattern, j) => {
        const problem = globProblem(pattern);
        if (!problem) return;
        const path = ['datasets', i, 'files', j];
        firstLine ??= positions.get(pathKey(path))?.line;
        problems.push(`${at(path)}${describePath(path)} "${pattern}" ${problem}`);
      }),
    );
  }
  if (problems.length > 0) {
    throw new DataError(
      'bad-config',
      `${fileName} is not a valid Scatterwise config:\n${problems.map((p) => `  - ${p}`).join('\n')}`,
      firstLine === undefined ? { file: fileName } : { file: fileName, line: firstLine },
      `Fix the keys listed; the schema is ${SCHEMA_FILE} (VS Code checks the file as you type).`,
    );
  }
  return value as ProjectConfig;
}

/** The first dataset whose globs match `relativePath` (relative to the config's folder, `/`-separated). */
export function datasetFor(config: ProjectConfig, relativePath: string): DatasetConfig | undefined {
  return config.datasets.find((dataset) => dataset.files.some((pattern) => globMatches(pattern, relativePath)));
}

/** The fit options a dataset sets (only those it sets). */
export function datasetFitOptions(dataset: DatasetConfig | undefined): Partial<FitOptions> {
  if (!dataset) return {};
  const options: Partial<FitOptions> = {};
  if (dataset.label !== undefined) options.label = dataset.label;
  if (dataset.features !== undefined) options.features = [...dataset.features];
  if (dataset.exclude !== undefined) options.exclude = [...dataset.exclude];
  if (dataset.missing !== undefined) options.missing = dataset.missing;
  if (dataset.solver !== undefined) options.solver = dataset.solver;
  if (dataset.priors !== undefined) options.priors = dataset.priors;
  if (dataset.cv !== undefined) options.cv = dataset.cv;
  if (dataset.seed !== undefined) options.seed = dataset.seed;
  if (dataset.pca !== undefined) options.pcaScale = dataset.pca;
  const read: FitOptions['read'] = {};
  if (dataset.delimiter !== undefined) read.delimiter = dataset.delimiter;
  if (dataset.header !== undefined) read.header = dataset.header;
  if (dataset.skipRaggedRows !== undefined) read.skipRaggedRows = dataset.skipRaggedRows;
  if (Object.keys(read).length > 0) options.read = read;
  return options;
}

/**
 * Options of the command line (or the editor's panel) over those of the config: a key given on
 * top replaces the config's; the read options merge key by key.
 */
export function mergeFitOptions(fromConfig: Partial<FitOptions>, onTop: Partial<FitOptions>): Partial<FitOptions> {
  const merged: Partial<FitOptions> = { ...fromConfig };
  for (const [key, value] of Object.entries(onTop) as [keyof FitOptions, unknown][]) {
    if (value !== undefined && key !== 'read') (merged as Record<string, unknown>)[key] = value;
  }
  const read = { ...(fromConfig.read ?? {}), ...Object.fromEntries(Object.entries(onTop.read ?? {}).filter(([, v]) => v !== undefined)) };
  if (Object.keys(read).length > 0 || fromConfig.read || onTop.read) merged.read = read;
  return merged;
}

/** The gates of a file: its dataset's, else the config's top-level ones (the caller applies the defaults). */
export function configGates(config: ProjectConfig | undefined, dataset: DatasetConfig | undefined): GateRules | undefined {
  return dataset?.gates ?? config?.gates;
}
