/**
 * The JSON shape of an agreement report, as `veil agreement --json` prints it and the API's
 * `agreement` operation returns it. Types only (no runtime code), so that app/api-contract.ts can
 * re-export them to the renderer.
 *
 * Every number is finite or null; where a statistic is undefined the group's `notes` say why.
 */

import type { IccForm } from './icc.ts';

export type IccFormName = IccForm;

/** A point estimate with its 95% confidence interval. */
export interface Estimate {
  value: number | null;
  ci95: [number, number] | null;
}

/** A kappa-type coefficient: its standard error where analytic, and a convention's word. */
export interface CoefficientEstimate extends Estimate {
  /** Analytic standard error; null for bootstrap intervals. */
  se: number | null;
  /** Landis & Koch (1977) word — a convention, see AgreementReport.interpretation. */
  interpretation: string | null;
}

export interface IccEstimateJson extends Estimate {
  F: number | null;
  df1: number | null;
  df2: number | null;
  p: number | null;
}

export interface AnovaLineJson {
  df: number;
  ss: number;
  ms: number | null;
}

export interface IccAnovaJson {
  between_cases: AnovaLineJson;
  within_cases: AnovaLineJson;
  between_readers: AnovaLineJson;
  residual: AnovaLineJson;
  total: { df: number; ss: number };
}

export interface CohenPairJson {
  /** Reader codes, in sorted order. */
  readers: [string, string];
  /** Cases both readers scored. */
  n: number;
  unweighted: CoefficientEstimate;
  linear: CoefficientEstimate;
  quadratic: CoefficientEstimate;
}

/** The cases and readers one statistic used, and how it treated missing ratings. */
export interface UsedJson {
  cases: number;
  readers: number;
  missing: string;
}

export type StatisticName =
  | 'icc' | 'fleiss_kappa' | 'krippendorff_alpha' | 'kendall_w' | 'gwet' | 'percent_agreement' | 'cohen_pairs' | 'light_kappa';

export interface AgreementGroupJson {
  /** Method id, or "*" for all methods pooled. */
  method: string;
  question: string;
  /** What one rated subject is: a case, or (pooled over methods) a case-method image. */
  subject: 'case' | 'case x method';
  /** Subjects with at least one rating. */
  cases: number;
  /** Readers with at least one rating. */
  readers: number;
  ratings: number;
  /** Score categories: the question's scale, or (no scale given) the scores observed. */
  categories: number[];
  categories_from: 'scale' | 'observed';
  icc: Record<IccFormName, IccEstimateJson>;
  icc_anova: IccAnovaJson | null;
  fleiss_kappa: CoefficientEstimate;
  krippendorff_alpha: { nominal: CoefficientEstimate; ordinal: CoefficientEstimate; interval: CoefficientEstimate };
  kendall_w: { value: number | null; chi2: number | null; df: number | null; p: number | null };
  gwet: { ac1: CoefficientEstimate; ac2_quadratic: CoefficientEstimate };
  percent_agreement: { exact: number | null; within_one: number | null };
  cohen_pairs: CohenPairJson[];
  /** Mean of the pairs' kappas (Light 1971), per weighting. */
  light_kappa: { unweighted: CoefficientEstimate; linear: CoefficientEstimate; quadratic: CoefficientEstimate; pairs: number };
  used: Record<StatisticName, UsedJson>;
  /** Why a value is null, and what was left out. */
  notes: string[];
}

export interface AgreementReport {
  groups: AgreementGroupJson[];
  bootstrap: { resamples: number; seed: number; method: string };
  /** The convention behind every `interpretation` word. */
  interpretation: string;
}
