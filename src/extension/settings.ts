/**
 * The `scatterwise.*` settings, read into fit options. The manifest declares their allowed values;
 * a value edited by hand outside them falls back to the default and is logged, not thrown.
 */
import * as vscode from 'vscode';
import { DEFAULT_FIT_OPTIONS, MISSING_POLICIES, PRIORS, SOLVERS, type CvMethod, type FitOptions } from '../core/types';

export interface ScatterwiseSettings {
  options: Partial<FitOptions>;
  plotBudget: number;
  /** Settings that were out of range and replaced by their default, in words. */
  problems: string[];
}

export const CROSS_VALIDATION_PATTERN = /^(auto|none|loo|kfold:([2-9]|[1-9][0-9]+))$/;

function pick<T extends string>(value: unknown, allowed: readonly T[], fallback: T, name: string, problems: string[]): T {
  if (allowed.includes(value as T)) return value as T;
  problems.push(`scatterwise.${name} = ${JSON.stringify(value)} is not one of ${allowed.join(', ')}; using ${fallback}.`);
  return fallback;
}

export function readSettings(configuration: vscode.WorkspaceConfiguration = vscode.workspace.getConfiguration('scatterwise')): ScatterwiseSettings {
  const problems: string[] = [];
  const solver = pick(configuration.get('solver'), SOLVERS, DEFAULT_FIT_OPTIONS.solver, 'solver', problems);
  const priors = pick(configuration.get('priors'), PRIORS, DEFAULT_FIT_OPTIONS.priors, 'priors', problems);
  const missing = pick(configuration.get('missingValues'), MISSING_POLICIES, DEFAULT_FIT_OPTIONS.missing, 'missingValues', problems);
  let cv = configuration.get<string>('crossValidation') ?? DEFAULT_FIT_OPTIONS.cv;
  if (!CROSS_VALIDATION_PATTERN.test(cv)) {
    problems.push(`scatterwise.crossValidation = ${JSON.stringify(cv)} is not auto, none, loo or kfold:N (N ≥ 2); using auto.`);
    cv = 'auto';
  }
  let plotBudget = configuration.get<number>('plotBudget') ?? DEFAULT_FIT_OPTIONS.plotBudget;
  if (!Number.isInteger(plotBudget) || plotBudget < 0) {
    problems.push(`scatterwise.plotBudget = ${JSON.stringify(plotBudget)} is not a whole number ≥ 0; using ${DEFAULT_FIT_OPTIONS.plotBudget}.`);
    plotBudget = DEFAULT_FIT_OPTIONS.plotBudget;
  }
  return { options: { solver, priors, missing, cv: cv as CvMethod, plotBudget }, plotBudget, problems };
}
