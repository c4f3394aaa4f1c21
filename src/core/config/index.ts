/** The project config: reading and checking it, finding a file's settings, saving roles into it. */
export { globMatches, globProblem, globToRegExp } from './glob';
export { describePath, parseJsonWithPositions } from './jsonText';
export type { JsonPath, TextPosition } from './jsonText';
export {
  CONFIG_FILE_NAME,
  configGates,
  datasetFitOptions,
  datasetFor,
  mergeFitOptions,
  parseProjectConfig,
  PROJECT_SCHEMA,
  SCHEMA_FILE,
} from './projectConfig';
export type { DatasetConfig, LoadedConfig, ProjectConfig } from './projectConfig';
export { saveRolesToConfig } from './savedRoles';
export type { SavedConfig, SavedRoles } from './savedRoles';
export { assertSupportedSchema, checkAgainstSchema, describeProblem } from './schemaCheck';
export type { JsonSchema, SchemaProblem } from './schemaCheck';
