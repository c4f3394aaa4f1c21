/**
 * The project config: the schema matches the options the code accepts, the sample workspace's
 * config passes, wrong configs fail with messages naming the key and its line, the JSON reader
 * agrees with JSON.parse, globs agree with Node's own glob matcher, and saving roles round-trips.
 */
import * as assert from 'node:assert/strict';
import { readdirSync, readFileSync } from 'node:fs';
import * as path from 'node:path';
import {
  checkAgainstSchema,
  CONFIG_FILE_NAME,
  datasetFitOptions,
  datasetFor,
  globMatches,
  globProblem,
  mergeFitOptions,
  parseJsonWithPositions,
  parseProjectConfig,
  PROJECT_SCHEMA,
  saveRolesToConfig,
} from '../../src/core/config/index';
import type { SavedRoles } from '../../src/core/config/index';
import { SEVERITIES } from '../../src/core/compare/gateRules';
import { DataError } from '../../src/core/errors';
import { DELIMITERS, MAX_SEED, parseCvMethod } from '../../src/core/pipeline/options';
import { MISSING_POLICIES, PCA_SCALES, PRIORS, SOLVERS } from '../../src/core/types';

const root = path.resolve(__dirname, '../../..');
const sampleConfigPath = path.join(root, 'sample-workspace', CONFIG_FILE_NAME);
const sampleConfigText = readFileSync(sampleConfigPath, 'utf8');

type Schema = Record<string, any>;
const definitions = (PROJECT_SCHEMA as Schema).definitions as Record<string, Schema>;

function configError(text: string): DataError {
  try {
    parseProjectConfig(text, 'scatterwise.config.json');
  } catch (error) {
    assert.ok(error instanceof DataError, `expected a DataError, got ${String(error)}`);
    return error;
  }
  assert.fail('the config was accepted');
}

describe('project config schema', () => {
  it('allows exactly the option values the code declares', () => {
    const dataset = definitions.dataset!.properties as Record<string, Schema>;
    assert.deepEqual(dataset.solver!.enum, [...SOLVERS]);
    assert.deepEqual(dataset.priors!.enum, [...PRIORS]);
    assert.deepEqual(dataset.missing!.enum, [...MISSING_POLICIES]);
    assert.deepEqual(dataset.pca!.enum, [...PCA_SCALES]);
    assert.deepEqual(dataset.delimiter!.enum, [...DELIMITERS]);
    assert.equal(dataset.seed!.maximum, MAX_SEED);
    assert.deepEqual((definitions.gates!.properties as Record<string, Schema>).newFindingAtOrAbove!.enum, [...SEVERITIES]);
  });

  it('accepts the same cross-validation methods as the option parser', () => {
    const pattern = new RegExp((definitions.dataset!.properties as Record<string, Schema>).cv!.pattern as string, 'u');
    const candidates = ['auto', 'none', 'loo', 'LOO', 'kfold', 'kfold:', 'kfold:x', 'kfold:-2', 'kfold:02', ' loo', 'kfold:1e1'];
    for (let n = 0; n <= 1200; n++) candidates.push(`kfold:${n}`);
    for (const candidate of candidates) {
      let parsed: boolean;
      try {
        parsed = parseCvMethod(candidate) === candidate;
      } catch {
        parsed = false;
      }
      assert.equal(pattern.test(candidate), parsed, `schema and parseCvMethod disagree on '${candidate}'`);
    }
  });

  it('validates the sample workspace config, and every sample data file has a dataset', () => {
    const config = parseProjectConfig(sampleConfigText, 'sample-workspace/scatterwise.config.json');
    const files = readdirSync(path.join(root, 'sample-workspace', 'data')).filter((name) => /\.(csv|tsv|parquet)$/.test(name));
    assert.ok(files.length >= 5);
    for (const name of files) {
      const dataset = datasetFor(config, `data/${name}`);
      assert.ok(dataset, `no dataset matches data/${name}`);
      assert.equal(dataset.label, 'fault');
    }
    const pump = datasetFitOptions(datasetFor(config, 'data/pump-faults.csv'));
    assert.deepEqual(pump, { label: 'fault', exclude: ['pump_id'], missing: 'drop-rows', solver: 'auto', priors: 'empirical', cv: 'auto', seed: 1 });
    assert.equal(datasetFor(config, 'data/seal-leak.csv')?.cv, 'loo');
    assert.equal(datasetFor(config, 'data/new/extra.parquet')?.files[0], 'data/**/*.{csv,tsv,parquet}');
    assert.equal(datasetFor(config, 'elsewhere/extra.csv'), undefined);
  });

  it('rejects a wrong value, naming the key, its line and what is allowed', () => {
    const text = sampleConfigText.replace('"solver": "auto"', '"solver": "fast"');
    const line = text.split('\n').findIndex((l) => l.includes('"fast"')) + 1;
    const error = configError(text);
    assert.equal(error.code, 'bad-config');
    assert.match(error.message, new RegExp(`line ${line}, column \\d+: datasets\\[0\\]\\.solver must be one of "auto", "exact", "shrinkage" \\(got "fast"\\)`));
    assert.equal(error.where.line, line);
  });

  it('rejects a misspelt key and suggests the right one', () => {
    const error = configError('{ "datasets": [ { "files": ["a.csv"], "lable": "fault" } ] }');
    assert.match(error.message, /datasets\[0\]\.lable is not a known key \(did you mean "label"\?\)/);
  });

  it('lists every problem at once: a missing key, a number out of range, a bad type, a bad glob', () => {
    const error = configError(
      JSON.stringify({ datasets: [{ label: 'x' }, { files: ['/abs/*.csv', '../up.csv'] }], gates: { minAccuracy: 1.5, classDisappears: 'yes' } }, null, 2),
    );
    assert.match(error.message, /datasets\[0\] needs the key "files"/);
    assert.match(error.message, /gates\.minAccuracy must be at most 1 \(got 1\.5\)/);
    assert.match(error.message, /gates\.classDisappears must be true or false \(got "yes"\)/);
    // Glob problems are checked once the structure is right.
    const globs = configError(JSON.stringify({ datasets: [{ files: ['/abs/*.csv', '../up.csv', 'data/{a,b'] }] }, null, 2));
    assert.match(globs.message, /datasets\[0\]\.files\[0\] "\/abs\/\*\.csv" must be relative/);
    assert.match(globs.message, /datasets\[0\]\.files\[1\] "\.\.\/up\.csv" must not climb out/);
    assert.match(globs.message, /datasets\[0\]\.files\[2\] "data\/\{a,b" has a '\{' without its '\}'/);
  });

  it('reports JSON syntax errors at their line and column', () => {
    const error = configError('{\n  "datasets": [\n    { "files": ["a.csv"], }\n  ]\n}\n');
    assert.equal(error.code, 'config-syntax');
    assert.match(error.message, /line 3, column 27: expected a key in double quotes but found '\}'/);
    assert.match(configError('{ "datasets": [], "datasets": [] }').message, /the key "datasets" appears twice/);
    assert.match(configError('').message, /line 1, column 1: expected a value but found the end of the file/);
  });

  it('uses only schema keywords the checker enforces (checked at load), and flags a non-conforming value', () => {
    assert.deepEqual(checkAgainstSchema({ datasets: [{ files: ['x.csv'] }] }, PROJECT_SCHEMA), []);
    assert.equal(checkAgainstSchema({ datasets: [] }, PROJECT_SCHEMA)[0]?.message, 'must list at least one entry');
    assert.match(checkAgainstSchema({ datasets: [{ files: ['a', 'a'] }] }, PROJECT_SCHEMA)[0]?.message ?? '', /repeats entry \[0\]/);
  });
});

describe('JSON reader with positions', () => {
  it('returns what JSON.parse returns', () => {
    const documents = [
      sampleConfigText,
      readFileSync(path.join(root, 'package.json'), 'utf8'),
      readFileSync(path.join(root, 'schemas', 'scatterwise.schema.json'), 'utf8'),
      '[1, -0.5, 2e10, -3E-2, 0, true, false, null, "a\\"b\\\\c\\/d\\b\\f\\n\\r\\t\\u00e9\\ud83d\\ude00", {}, [], {"__proto__": 1}]',
      '  "just a string"  ',
    ];
    for (const text of documents) assert.deepEqual(parseJsonWithPositions(text, 'x.json').value, JSON.parse(text));
  });

  it('refuses what JSON.parse refuses', () => {
    for (const text of ['{"a": 1,}', '[1 2]', '01', '1.', '.5', '"\t"', "{'a': 1}", '{"a" 1}', 'tru', '[1] x', '"\\x"', '+1', 'NaN']) {
      assert.throws(() => JSON.parse(text));
      assert.throws(() => parseJsonWithPositions(text, 'x.json'), DataError, text);
    }
  });

  it('records the line and column of keys and array items', () => {
    const { positions } = parseJsonWithPositions('{\n  "a": [\n    10,\n    {"b": 2}\n  ]\n}', 'x.json');
    assert.deepEqual(positions.get('a'), { line: 2, column: 3 });
    assert.deepEqual(positions.get('a\u00000'), { line: 3, column: 5 });
    assert.deepEqual(positions.get('a\u00001\u0000b'), { line: 4, column: 6 });
  });
});

describe('file globs', () => {
  // Reference: Node's own glob matcher (path.posix.matchesGlob, minimatch semantics), on patterns
  // and paths where the two documented syntaxes agree (no dot-files, no `**` matching its folder).
  const patterns = [
    'data/*.csv', 'data/**/*.csv', '**/*.parquet', 'data/pump-?aults.csv', 'data/[ps]*.csv', 'data/[!p]*.csv',
    'data/*.{csv,tsv}', '*/*.csv', 'data/**', 'data/a-[0-9].csv', 'data/**/x/*.tsv', 'data/pump-faults.csv',
  ];
  const paths = [
    'data/pump-faults.csv', 'data/seal-leak.csv', 'data/pump-faults.tsv', 'data/sub/pump.csv', 'data/sub/deeper/x.csv',
    'data/x/y.tsv', 'data/sub/x/y.tsv', 'data/a-7.csv', 'data/a-x.csv', 'other/file.parquet', 'file.parquet',
    'data/pump-faults.csv.bak', 'datax/pump.csv', 'data/sub/file.parquet',
  ];
  const matchesGlob = (path.posix as unknown as { matchesGlob?: (p: string, g: string) => boolean }).matchesGlob;

  it('agrees with Node’s glob matcher', function () {
    if (!matchesGlob) this.skip();
    for (const pattern of patterns) {
      for (const candidate of paths) {
        assert.equal(globMatches(pattern, candidate), matchesGlob!(candidate, pattern), `${pattern} vs ${candidate}`);
      }
    }
  });

  it('ignores a leading ./ and takes escapes literally', () => {
    assert.ok(globMatches('./data/*.csv', 'data/x.csv'));
    assert.ok(globMatches('data/*.csv', './data/x.csv'));
    assert.ok(globMatches('data/\\*.csv', 'data/*.csv'));
    assert.ok(!globMatches('data/\\*.csv', 'data/x.csv'));
    assert.equal(globProblem('data\\x.csv'), 'uses a backslash: write paths with /');
    assert.equal(globProblem('{data,other/x}/*.csv'), "has a '/' inside {…}: alternatives must stay within one folder level");
  });
});

describe('saving roles to the config', () => {
  const roles: SavedRoles = { label: 'fault', features: ['kurtosis', 'crest_factor'], exclude: undefined, solver: 'shrinkage', priors: 'empirical', cv: 'kfold:5', missing: 'drop-rows' };

  it('creates a config when there is none, and it reads back', () => {
    const saved = saveRolesToConfig(undefined, 'data/new.csv', roles);
    const config = parseProjectConfig(saved.text, 'x');
    assert.deepEqual(config, { datasets: [{ files: ['data/new.csv'], label: 'fault', features: ['kurtosis', 'crest_factor'], solver: 'shrinkage', cv: 'kfold:5' }] });
  });

  it('updates the dataset that lists the file, keeping its other keys and dropping defaults', () => {
    const saved = saveRolesToConfig(sampleConfigText, 'data/seal-leak.csv', { ...roles, cv: 'auto', features: undefined });
    const config = parseProjectConfig(saved.text, 'x');
    assert.deepEqual(config.datasets[1], { files: ['data/seal-leak.csv'], label: 'fault', solver: 'shrinkage' });
    assert.equal(config.datasets.length, 4);
    assert.deepEqual(config.gates, parseProjectConfig(sampleConfigText, 'x').gates);
    assert.match(saved.summary, /updated the roles of data\/seal-leak\.csv/);
  });

  it('puts a file matched only by a glob before that glob, so it takes effect for that file alone', () => {
    const saved = saveRolesToConfig(sampleConfigText, 'data/extra/more.csv', roles);
    const config = parseProjectConfig(saved.text, 'x');
    assert.equal(config.datasets.length, 5);
    assert.deepEqual(config.datasets[3]!.files, ['data/extra/more.csv']);
    assert.equal(datasetFor(config, 'data/extra/more.csv')?.solver, 'shrinkage');
    assert.equal(datasetFor(config, 'data/extra/other.csv')?.files[0], 'data/**/*.{csv,tsv,parquet}');
  });

  it('refuses to rewrite a config that is not valid', () => {
    assert.throws(() => saveRolesToConfig('{ "datasets": 3 }', 'a.csv', roles), /datasets must be an array/);
  });
});

describe('options from the config and the command line', () => {
  it('lets the command line win, key by key for the read options', () => {
    const merged = mergeFitOptions({ label: 'fault', solver: 'exact', read: { delimiter: ';', header: true } }, { solver: 'shrinkage', read: { header: false } });
    assert.deepEqual(merged, { label: 'fault', solver: 'shrinkage', read: { delimiter: ';', header: false } });
  });
});
