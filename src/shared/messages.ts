/**
 * Every message between the extension host and the panel. Both sides import this module; both
 * check what they receive with the guards below, since a webview message is untrusted input.
 * Protocol: the panel posts `ready` once loaded; only then does the host post anything.
 */
import type { FitOptions } from '../core/types';
import { isPackedSample, type PanelReport } from './packedSample';

export type { PackedSample, PanelReport } from './packedSample';

/** Settings the panel needs to draw (from the `scatterwise.*` configuration). */
export interface PanelSettings {
  plotBudget: number;
}

/** The options a user can change in the panel's role form. */
export type EditableOptions = Pick<FitOptions, 'label' | 'features' | 'exclude' | 'solver' | 'priors' | 'cv' | 'missing'>;

/** Column facts the role form needs (from the reader's inspection). */
export interface ColumnChoice {
  name: string;
  kind: 'numeric' | 'text' | 'empty' | 'nested';
  distinct: number;
}

// ---- host → panel -------------------------------------------------------------------------

export interface InitMessage {
  type: 'init';
  fileName: string;
  settings: PanelSettings;
  /** Restored state, if the panel was hidden and shown again. */
}
export interface ProgressMessage {
  type: 'progress';
  phase: string;
  fraction: number;
}
export interface ResultMessage {
  type: 'result';
  /** The report with its plot sample packed into typed arrays (packedSample.ts). */
  report: PanelReport;
  columns: ColumnChoice[];
  options: EditableOptions;
}
export interface ErrorMessage {
  type: 'error';
  /** One plain sentence of what went wrong, naming file, row and column where known. */
  message: string;
  /** What to do next. */
  hint?: string;
  code: string;
  columns?: ColumnChoice[];
  options?: EditableOptions;
}
export interface ComparisonMessage {
  type: 'comparison';
  baseName: string;
  base: PanelReport;
  head: PanelReport;
  /** Notable changes in words, most important first. */
  changes: string[];
  /** The gates `scatterwise compare` would check for this file (config or defaults), with their outcome. */
  gates?: { rule: string; passed: boolean; detail: string }[];
}
export type ToPanel = InitMessage | ProgressMessage | ResultMessage | ErrorMessage | ComparisonMessage;

// ---- panel → host -------------------------------------------------------------------------

export interface ReadyMessage {
  type: 'ready';
}
export interface RefitMessage {
  type: 'refit';
  options: EditableOptions;
}
export interface RevealRowMessage {
  type: 'revealRow';
  /** 0-based data row. */
  row: number;
  /** 1-based line, when the report knows it. */
  line?: number;
}
export interface ExportMessage {
  type: 'export';
  /** Suggested file name, e.g. `ld-scatter.svg`. */
  fileName: string;
  kind: 'png' | 'svg' | 'markdown';
  /** SVG or Markdown text, or a PNG as a base64 data URL. */
  data: string;
}
export interface CommandMessage {
  type: 'command';
  command: 'generateScript' | 'compareWithHead' | 'saveRoles' | 'cancel';
}
export type FromPanel = ReadyMessage | RefitMessage | RevealRowMessage | ExportMessage | CommandMessage;

// ---- guards -----------------------------------------------------------------------------------

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null;
const isString = (v: unknown): v is string => typeof v === 'string';
const isStringArray = (v: unknown): v is string[] => Array.isArray(v) && v.every(isString);
const optional = <T>(v: unknown, check: (x: unknown) => x is T): boolean => v === undefined || check(v);

function isEditableOptions(v: unknown): v is EditableOptions {
  return (
    isRecord(v) &&
    optional(v.label, isString) &&
    optional(v.features, isStringArray) &&
    optional(v.exclude, isStringArray) &&
    ['auto', 'exact', 'shrinkage'].includes(v.solver as string) &&
    ['empirical', 'uniform'].includes(v.priors as string) &&
    isString(v.cv) && /^(auto|none|loo|kfold:\d+)$/.test(v.cv) &&
    ['drop-rows', 'drop-columns'].includes(v.missing as string)
  );
}

/** Checks a message from the panel; anything else is dropped by the host. */
export function isFromPanel(v: unknown): v is FromPanel {
  if (!isRecord(v) || !isString(v.type)) return false;
  switch (v.type) {
    case 'ready':
      return true;
    case 'refit':
      return isEditableOptions(v.options);
    case 'revealRow':
      return Number.isInteger(v.row) && (v.row as number) >= 0 && optional(v.line, (x): x is number => Number.isInteger(x));
    case 'export':
      return isString(v.fileName) && ['png', 'svg', 'markdown'].includes(v.kind as string) && isString(v.data);
    case 'command':
      return ['generateScript', 'compareWithHead', 'saveRoles', 'cancel'].includes(v.command as string);
    default:
      return false;
  }
}

const isReport = (v: unknown): boolean => isRecord(v) && isPackedSample(v.sample);

/** Checks a message from the host (shape only, and that plot samples are packed; the report is our own type). */
export function isToPanel(v: unknown): v is ToPanel {
  if (!isRecord(v) || !isString(v.type)) return false;
  switch (v.type) {
    case 'init':
      return isString(v.fileName) && isRecord(v.settings);
    case 'progress':
      return isString(v.phase) && typeof v.fraction === 'number';
    case 'result':
      return isReport(v.report) && Array.isArray(v.columns) && isEditableOptions(v.options);
    case 'error':
      return isString(v.message) && isString(v.code);
    case 'comparison':
      return isString(v.baseName) && isReport(v.base) && isReport(v.head) && isStringArray(v.changes);
    default:
      return false;
  }
}
