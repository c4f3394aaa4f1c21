/**
 * "Save these roles to the project config": the new text of the config after recording one data
 * file's label, features, excluded columns and fit options. Pure: the editor reads and writes the
 * file; this only decides the content.
 *
 * - No config yet: a new one with a single dataset for the file.
 * - A dataset that lists exactly this path: its role and option keys are replaced (keys equal to
 *   the defaults are removed, so the config stays short); its other keys (seed, gates, …) are kept.
 * - Otherwise a new dataset for the file alone, placed before the first dataset whose glob matches
 *   it (the first match wins, so the new one takes effect without touching the glob's other files),
 *   or at the end.
 *
 * An existing config that is not valid is not rewritten: the DataError lists what to fix first.
 */
import { DEFAULT_FIT_OPTIONS, type FitOptions } from '../types';
import { globMatches } from './glob';
import { CONFIG_FILE_NAME, parseProjectConfig, type DatasetConfig, type ProjectConfig } from './projectConfig';

/** What the panel's role form holds. */
export type SavedRoles = Pick<FitOptions, 'label' | 'features' | 'exclude' | 'solver' | 'priors' | 'cv' | 'missing'>;

/** Keys written for a file, in the order a new dataset lists them. */
const ROLE_KEYS = ['label', 'features', 'exclude', 'missing', 'solver', 'priors', 'cv'] as const;

function roleValues(roles: SavedRoles): Partial<Record<(typeof ROLE_KEYS)[number], unknown>> {
  return {
    label: roles.label,
    features: roles.features && roles.features.length > 0 ? [...roles.features] : undefined,
    exclude: roles.exclude && roles.exclude.length > 0 ? [...roles.exclude] : undefined,
    missing: roles.missing === DEFAULT_FIT_OPTIONS.missing ? undefined : roles.missing,
    solver: roles.solver === DEFAULT_FIT_OPTIONS.solver ? undefined : roles.solver,
    priors: roles.priors === DEFAULT_FIT_OPTIONS.priors ? undefined : roles.priors,
    cv: roles.cv === DEFAULT_FIT_OPTIONS.cv ? undefined : roles.cv,
  };
}

function newDataset(relativePath: string, roles: SavedRoles): DatasetConfig {
  const dataset: Record<string, unknown> = { files: [relativePath] };
  for (const [key, value] of Object.entries(roleValues(roles))) if (value !== undefined) dataset[key] = value;
  return dataset as unknown as DatasetConfig;
}

function updateDataset(dataset: DatasetConfig, roles: SavedRoles): DatasetConfig {
  const updated: Record<string, unknown> = { ...dataset };
  for (const [key, value] of Object.entries(roleValues(roles))) {
    if (value === undefined) delete updated[key];
    else updated[key] = value;
  }
  return updated as unknown as DatasetConfig;
}

export interface SavedConfig {
  text: string;
  /** What was done, in words, for the message the editor shows. */
  summary: string;
}

/**
 * The config text with `roles` recorded for the file at `relativePath` (relative to the config's
 * folder, `/`-separated). `existing` is the current text, or undefined when there is no config.
 */
export function saveRolesToConfig(existing: string | undefined, relativePath: string, roles: SavedRoles, fileName = CONFIG_FILE_NAME): SavedConfig {
  const path = relativePath.replace(/^(\.\/)+/, '');
  if (existing === undefined || existing.trim() === '') {
    const config: ProjectConfig = { datasets: [newDataset(path, roles)] };
    return { text: `${JSON.stringify(config, null, 2)}\n`, summary: `created ${fileName} with the roles of ${path}` };
  }
  const config = parseProjectConfig(existing, fileName);
  const exact = config.datasets.findIndex((dataset) => dataset.files.length === 1 && dataset.files[0]!.replace(/^(\.\/)+/, '') === path);
  let summary: string;
  const datasets = [...config.datasets];
  if (exact >= 0) {
    datasets[exact] = updateDataset(datasets[exact]!, roles);
    summary = `updated the roles of ${path} in ${fileName}`;
  } else {
    const matching = datasets.findIndex((dataset) => dataset.files.some((pattern) => globMatches(pattern, path)));
    if (matching >= 0) {
      datasets.splice(matching, 0, newDataset(path, roles));
      summary = `added ${path} to ${fileName}, before the dataset ${JSON.stringify(config.datasets[matching]!.files)} that also matches it`;
    } else {
      datasets.push(newDataset(path, roles));
      summary = `added ${path} to ${fileName}`;
    }
  }
  const updated = { ...config, datasets };
  const text = `${JSON.stringify(updated, null, 2)}\n`;
  // What we write must read back: a bug here must not leave the user a broken config.
  parseProjectConfig(text, fileName);
  return { text, summary };
}
