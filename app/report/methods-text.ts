/**
 * The generated methods paragraph: names each statistical method the report used, with its
 * citation, and the software with its version, so an analyst can paste it into a manuscript and
 * edit. Sentences are only included for sections present in the analysis.
 */
import type { AnalysisSettings } from './analysis-types.ts';
import type { ComparisonReport } from '../stats/comparison/comparison.ts';

export interface MethodsTextInputs {
  product: string;
  version: string;
  readers: number;
  cases: number;
  methods: number;
  settings: AnalysisSettings;
  comparison: ComparisonReport;
  agreement: boolean;
  agreementResamples: number;
  linkage: boolean;
  blinding: boolean;
}

export const REFERENCES: Record<string, string> = {
  wilson: 'Wilson EB. Probable inference, the law of succession, and statistical inference. J Am Stat Assoc. 1927;22:209–212.',
  wilcoxon: 'Wilcoxon F. Individual comparisons by ranking methods. Biometrics Bull. 1945;1:80–83.',
  pratt: 'Pratt JW. Remarks on zeros and ties in the Wilcoxon signed rank procedures. J Am Stat Assoc. 1959;54:655–667.',
  friedman: 'Friedman M. The use of ranks to avoid the assumption of normality implicit in the analysis of variance. J Am Stat Assoc. 1937;32:675–701.',
  kendall: 'Kendall MG, Babington Smith B. The problem of m rankings. Ann Math Stat. 1939;10:275–287.',
  holm: 'Holm S. A simple sequentially rejective multiple test procedure. Scand J Stat. 1979;6:65–70.',
  or: 'Obuchowski NA, Rockette HE. Hypothesis testing of diagnostic accuracy for multiple readers and multiple tests: an ANOVA approach with dependent observations. Commun Stat Simul Comput. 1995;24:285–308.',
  hillis: 'Hillis SL. A comparison of denominator degrees of freedom methods for multiple observer ROC analysis. Stat Med. 2007;26:596–619.',
  hillis2005: 'Hillis SL, Obuchowski NA, Schartz KM, Berbaum KS. A comparison of the Dorfman–Berbaum–Metz and Obuchowski–Rockette methods for receiver operating characteristic (ROC) data. Stat Med. 2005;24:1579–1607.',
  beiden: 'Beiden SV, Wagner RF, Campbell G. Components-of-variance models and multiple-bootstrap experiments: an alternative method for random-effects, receiver operating characteristic analysis. Acad Radiol. 2000;7:341–349.',
  shrout: 'Shrout PE, Fleiss JL. Intraclass correlations: uses in assessing rater reliability. Psychol Bull. 1979;86:420–428.',
  fleiss: 'Fleiss JL. Measuring nominal scale agreement among many raters. Psychol Bull. 1971;76:378–382.',
  cohen: 'Cohen J. Weighted kappa: nominal scale agreement with provision for scaled disagreement or partial credit. Psychol Bull. 1968;70:213–220.',
  krippendorff: 'Krippendorff K. Computing Krippendorff\'s alpha-reliability. 2011. Departmental Papers (ASC), University of Pennsylvania.',
  gwet: 'Gwet KL. Computing inter-rater reliability and its variance in the presence of high agreement. Br J Math Stat Psychol. 2008;61:29–48.',
  mt: 'Matsumoto M, Nishimura T. Mersenne twister: a 623-dimensionally equidistributed uniform pseudo-random number generator. ACM Trans Model Comput Simul. 1998;8:3–30.',
  okabe: 'Okabe M, Ito K. Color Universal Design (CUD): how to make figures and presentations that are friendly to colorblind people. 2008. https://jfly.uni-koeln.de/color/',
  tol: 'Tol P. Colour schemes. SRON Technical Note SRON/EPS/TN/09-002, 2021.',
};

export function methodsText(x: MethodsTextInputs): { paragraph: string; references: string[] } {
  const used = new Set<string>(['wilson', 'wilcoxon', 'pratt', 'holm', 'friedman', 'kendall', 'or', 'hillis', 'hillis2005', 'beiden', 'mt']);
  const s: string[] = [];
  s.push(`${x.readers} readers scored ${x.cases} cases reconstructed with ${x.methods} methods on Likert scales, blinded to the method.`);
  s.push(`For each method and question we report the mean, standard deviation, median and interquartile range of the scores, and the share of scores of ${x.settings.acceptable} or higher with Wilson score 95% confidence intervals [wilson].`);
  s.push('Methods were compared on reader-averaged per-case scores with the two-sided Wilcoxon signed-rank test [wilcoxon] (exact null distribution without ties or zero differences; otherwise the normal approximation with Pratt\'s treatment of zeros and a tie correction [pratt]), with Holm\'s correction across all pairs of methods per question [holm], and across all methods with the Friedman test [friedman] with Kendall\'s W as effect size [kendall].');
  s.push('To generalize to other readers and other cases, the difference in mean score was analysed with the Obuchowski–Rockette model [or] with readers and cases random, covariances estimated by the jackknife over cases [hillis2005] and Hillis\'s denominator degrees of freedom [hillis]; a two-way bootstrap resampling readers and cases independently [beiden] ' +
    `(${x.comparison.resamples} resamples, percentile intervals) gave a second estimate.`);
  if (x.settings.compareTo) s.push(`Differences are reported as each method minus the standard method, ${x.settings.compareTo}.`);
  if (x.settings.noninferiorityMargin !== null && x.settings.compareTo) {
    s.push(`A method was called non-inferior to the standard when the lower bound of the two-sided 95% Obuchowski–Rockette–Hillis interval of the difference exceeded −${x.settings.noninferiorityMargin} score points (a one-sided test at the 2.5% level).`);
  }
  if (x.agreement) {
    for (const k of ['shrout', 'fleiss', 'cohen', 'krippendorff', 'gwet']) used.add(k);
    s.push(`Inter-reader agreement was summarized with intraclass correlations [shrout], Fleiss' kappa [fleiss], Cohen's weighted kappa for each pair of readers [cohen], Krippendorff's alpha [krippendorff] and Gwet's AC1/AC2 [gwet]${x.agreementResamples > 0 ? `, with case-bootstrap intervals (${x.agreementResamples} resamples) where no analytic interval exists` : ''}.`);
  }
  if (x.linkage) s.push("The link between objective image metrics and reader scores was measured with Spearman's rho, Kendall's tau-b and a within-case concordance, with case-bootstrap intervals.");
  if (x.blinding) s.push('Blinding strength was checked by how well a nearest-centroid classifier, validated leaving one case out, tells the methods apart from simple image statistics, with a permutation test.');
  s.push(`Random resampling used seeded MT19937 streams [mt], so every number repeats exactly. Figures use colour-blind-safe palettes [okabe; tol]. All analyses were run in ${x.product} ${x.version}.`);
  used.add('okabe');
  used.add('tol');
  const order = [...used];
  let text = s.join(' ');
  text = text.replace(/\[([a-z0-9; ]+)\]/g, (_, keys: string) => `[${keys.split(/;\s*/).map((k) => order.indexOf(k) + 1).join(', ')}]`);
  return { paragraph: text, references: order.map((k, i) => `${i + 1}. ${REFERENCES[k]}`) };
}
