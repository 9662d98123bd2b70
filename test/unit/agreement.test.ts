import { describe, expect, it } from 'vitest';
import { agreementByGroup, agreementReport, MISSING } from '../../app/stats/agreement.ts';
import { formatAgreementTable, fmt3 } from '../../app/stats/agreement-table.ts';
import type { AgreementGroupJson } from '../../app/stats/agreement-types.ts';
import { ICC_FORMS } from '../../app/stats/icc.ts';
import type { TidyRow } from '../../app/report/tidy-csv.ts';
import { psychSets, ratingSets, tidyRows } from './agreement-fixtures.ts';

function hasNonFinite(v: unknown): boolean {
  if (typeof v === 'number') return !Number.isFinite(v);
  if (Array.isArray(v)) return v.some(hasNonFinite);
  if (v && typeof v === 'object') return Object.values(v).some(hasNonFinite);
  return false;
}

const sets = ratingSets().sets;
const psych = psychSets().sets;
// Each invented set as one (method, question) group of its own, with its scale.
const allRows: TidyRow[] = sets.flatMap((s) => tidyRows(s.ratings, `m-${s.name}`, `q-${s.name}`));
const scales = Object.fromEntries(sets.map((s) => [`q-${s.name}`, { points: s.points }]));
const groups = agreementByGroup(allRows, { scales, bootstrap: 200, seed: 7 });

describe('agreement report: the JSON shape of the issue', () => {
  it('has every key of the issue, with the same nesting', () => {
    const g = groups[0];
    for (const key of ['method', 'question', 'cases', 'readers', 'ratings', 'icc', 'fleiss_kappa', 'krippendorff_alpha', 'kendall_w', 'gwet',
      'percent_agreement', 'cohen_pairs']) expect(g, key).toHaveProperty(key);
    expect(Object.keys(g.icc)).toEqual(['ICC(1,1)', 'ICC(2,1)', 'ICC(3,1)', 'ICC(1,k)', 'ICC(2,k)', 'ICC(3,k)']);
    for (const form of ICC_FORMS) expect(g.icc[form]).toMatchObject({ value: expect.any(Number), ci95: [expect.any(Number), expect.any(Number)] });
    expect(g.fleiss_kappa).toMatchObject({ value: expect.any(Number), ci95: [expect.any(Number), expect.any(Number)] });
    expect(Object.keys(g.krippendorff_alpha)).toEqual(['nominal', 'ordinal', 'interval']);
    expect(g.kendall_w).toEqual({ value: expect.any(Number), chi2: expect.any(Number), df: expect.any(Number), p: expect.any(Number) });
    expect(Object.keys(g.gwet)).toEqual(['ac1', 'ac2_quadratic']);
    expect(g.percent_agreement).toEqual({ exact: expect.any(Number), within_one: expect.any(Number) });
    expect(g.cohen_pairs[0]).toMatchObject({
      readers: ['R1', 'R2'], n: expect.any(Number),
      unweighted: { value: expect.any(Number), ci95: [expect.any(Number), expect.any(Number)] },
      linear: { value: expect.any(Number) }, quadratic: { value: expect.any(Number) },
    });
  });

  it('lists reader pairs in sorted order of reader code', () => {
    const rows = tidyRows([[1, 2, 3], [2, 2, 3], [3, 1, 2]], 'm', 'q').map((r) => ({ ...r, reader: { R1: 'zed', R2: 'amy', R3: 'kim' }[r.reader]! }));
    const [g] = agreementByGroup(rows, { bootstrap: 0 });
    expect(g.cohen_pairs.map((p) => p.readers)).toEqual([['amy', 'kim'], ['amy', 'zed'], ['kim', 'zed']]);
  });

  it('states, per statistic, the cases and readers used and how missing ratings were treated', () => {
    const g = groups.find((x) => x.method === 'm-likert5-missing-unbalanced')!;
    expect(g.cases).toBe(40);
    expect(g.used.icc).toEqual({ cases: 14, readers: 5, missing: MISSING.icc });
    expect(g.used.kendall_w.cases).toBe(14);
    expect(g.used.fleiss_kappa.cases).toBe(14);
    expect(g.used.gwet.cases).toBe(40);
    expect(g.used.krippendorff_alpha.missing).toMatch(/^native/);
    expect(g.used.cohen_pairs.missing).toMatch(/^pairwise/);
    expect(g.notes.join('\n')).toMatch(/26 of 40 cases lack a rating from some reader/);
  });

  it('is JSON-safe', () => {
    expect(hasNonFinite(groups)).toBe(false);
    expect(JSON.parse(JSON.stringify(groups))).toEqual(groups);
  });
});

describe('agreement report against the reference libraries, through tidy rows', () => {
  sets.forEach((set, s) => {
    it(`${set.name}: ICC (psych), Fleiss and Cohen (statsmodels), W (scipy), alpha (NLTK), Light (psych)`, () => {
      const g = groups.find((x) => x.method === `m-${set.name}`) as AgreementGroupJson;
      // Source: R psych::ICC on the complete cases (agreement-sets-psych.json).
      expect(g.used.icc.cases).toBe(psych[s].icc.cases);
      for (const form of ICC_FORMS) {
        const want = psych[s].icc.forms[form];
        expect(Math.abs(g.icc[form].value! - want.value), form).toBeLessThan(1e-9);
        expect(Math.abs(g.icc[form].ci95![0] - want.ci95[0]), form).toBeLessThan(1e-6);
        expect(Math.abs(g.icc[form].ci95![1] - want.ci95[1]), form).toBeLessThan(1e-6);
      }
      // Source: statsmodels fleiss_kappa, complete cases (agreement-sets.json).
      expect(Math.abs(g.fleiss_kappa.value! - set.fleiss_statsmodels.value)).toBeLessThan(1e-9);
      // Source: scipy friedmanchisquare (agreement-sets.json).
      expect(Math.abs(g.kendall_w.value! - set.kendall_w_scipy.value)).toBeLessThan(1e-9);
      expect(Math.abs(g.kendall_w.p! - set.kendall_w_scipy.p)).toBeLessThan(1e-9);
      // Source: NLTK alpha (agreement-sets.json).
      for (const level of ['nominal', 'ordinal', 'interval'] as const) {
        expect(Math.abs(g.krippendorff_alpha[level].value! - set.krippendorff_alpha_nltk[level]), level).toBeLessThan(1e-9);
      }
      // Source: statsmodels cohens_kappa per pair (agreement-sets.json).
      expect(g.cohen_pairs).toHaveLength(set.cohen_pairs_statsmodels.length);
      g.cohen_pairs.forEach((p, i) => {
        const ref = set.cohen_pairs_statsmodels[i];
        expect(p.readers).toEqual([`R${ref.readers[0] + 1}`, `R${ref.readers[1] + 1}`]);
        expect(p.n).toBe(ref.n);
        for (const w of ['unweighted', 'linear', 'quadratic'] as const) {
          expect(Math.abs(p[w].value! - ref[w].value), w).toBeLessThan(1e-9);
          expect(Math.abs(p[w].se! - ref[w].se), w).toBeLessThan(1e-9);
        }
      });
      // Source: R psych av.kappa / av.wt (agreement-sets-psych.json).
      expect(Math.abs(g.light_kappa.unweighted.value! - psych[s].light_kappa.unweighted)).toBeLessThan(1e-9);
      expect(Math.abs(g.light_kappa.quadratic.value! - psych[s].light_kappa.quadratic)).toBeLessThan(1e-9);
    });
  });

  it('Shrout & Fleiss (1979) Table 2 as tidy rows: ICC(2,1) = .29 and ICC(3,1) = .71', () => {
    // Source: Shrout & Fleiss (1979), Psychological Bulletin 86:420-428, Table 2 data and published ICCs.
    const sf = [[9, 2, 5, 8], [6, 1, 3, 2], [8, 4, 6, 8], [7, 1, 2, 6], [10, 5, 6, 9], [6, 2, 4, 7]];
    const [g] = agreementByGroup(tidyRows(sf, 'm', 'q'), { bootstrap: 0 });
    expect(g.icc['ICC(2,1)'].value).toBeCloseTo(0.29, 2);
    expect(g.icc['ICC(3,1)'].value).toBeCloseTo(0.71, 2);
    expect(g.icc_anova?.between_cases.df).toBe(5);
    expect(g.icc_anova?.residual.df).toBe(15);
  });
});

describe('pooled groups and bootstrap intervals', () => {
  const a = [[1, 2, 2], [3, 3, 4], [5, 4, 5], [2, 2, 1], [4, 4, 4], [3, 2, 3]];
  const b = [[2, 2, 3], [4, 5, 5], [1, 1, 2], [3, 3, 3], [5, 5, 4], [2, 3, 2]];
  const rows = [...tidyRows(a, 'm-a', 'sharpness'), ...tidyRows(b, 'm-b', 'sharpness')];

  it('pools over methods with each (case, method) image as one subject, after the per-method groups', () => {
    const out = agreementByGroup(rows, { scales: { sharpness: { points: 5 } }, bootstrap: 0 });
    expect(out.map((g) => g.method)).toEqual(['m-a', 'm-b', '*']);
    const pooled = out[2];
    expect(pooled).toMatchObject({ method: '*', question: 'sharpness', subject: 'case x method', cases: 12, readers: 3, ratings: 36 });
    // The same numbers as one method whose cases are the images.
    const asImages = rows.map((r) => ({ ...r, case: `${r.case}/${r.method}`, method: 'images' }));
    const [same] = agreementByGroup(asImages, { scales: { sharpness: { points: 5 } }, bootstrap: 0 });
    expect({ ...pooled, method: 'images', subject: 'case' }).toEqual(same);
    // No pooling when a filter leaves one method.
    expect(agreementByGroup(rows, { method: 'm-a', bootstrap: 0 }).map((g) => g.method)).toEqual(['m-a']);
  });

  it('bootstrap intervals are seeded: same seed same interval, other seed other interval, independent of filters', () => {
    const one = agreementByGroup(rows, { bootstrap: 300, seed: 5 });
    const again = agreementByGroup(rows, { bootstrap: 300, seed: 5 });
    const other = agreementByGroup(rows, { bootstrap: 300, seed: 6 });
    const filtered = agreementByGroup(rows, { bootstrap: 300, seed: 5, method: 'm-b' });
    expect(again).toEqual(one);
    expect(other[0].fleiss_kappa.ci95).not.toEqual(one[0].fleiss_kappa.ci95);
    expect(filtered[0]).toEqual(one[1]);
    for (const g of one) {
      const ci = g.krippendorff_alpha.ordinal.ci95!;
      expect(ci[0]).toBeLessThanOrEqual(g.krippendorff_alpha.ordinal.value!);
      expect(ci[1]).toBeGreaterThanOrEqual(g.krippendorff_alpha.ordinal.value!);
    }
    const none = agreementByGroup(rows, { bootstrap: 0 });
    expect(none[0].fleiss_kappa.ci95).toBeNull();
    expect(none[0].fleiss_kappa.value).toBe(one[0].fleiss_kappa.value);
  });

  it('words from Landis & Koch sit beside kappa-type values and the report names the convention', () => {
    const report = agreementReport(rows, { bootstrap: 0 });
    expect(report.interpretation).toMatch(/Landis & Koch \(1977\).*convention/);
    const g = report.groups[0];
    expect(['poor', 'slight', 'fair', 'moderate', 'substantial', 'almost perfect']).toContain(g.fleiss_kappa.interpretation);
    expect(report.bootstrap).toMatchObject({ resamples: 0, seed: 1 });
  });
});

describe('undefined statistics become null with a reason', () => {
  it('one reader', () => {
    const [g] = agreementByGroup(tidyRows([[1], [2], [3]], 'm', 'q'));
    expect(g.readers).toBe(1);
    expect(g.fleiss_kappa.value).toBeNull();
    for (const form of ICC_FORMS) expect(g.icc[form].value).toBeNull();
    expect(g.cohen_pairs).toEqual([]);
    expect(g.notes.join(' ')).toMatch(/only one reader \(R1\)/);
    expect(hasNonFinite(g)).toBe(false);
  });

  it('every score equal', () => {
    const [g] = agreementByGroup(tidyRows([[3, 3], [3, 3], [3, 3]], 'm', 'q'), { scales: { q: { points: 5 } } });
    expect(g.fleiss_kappa.value).toBeNull();
    expect(g.krippendorff_alpha.nominal.value).toBeNull();
    expect(g.kendall_w.value).toBeNull();
    expect(g.cohen_pairs[0].unweighted.value).toBeNull();
    expect(g.percent_agreement.exact).toBe(1);
    const notes = g.notes.join('\n');
    expect(notes).toMatch(/Fleiss' kappa undefined: every rating falls in one category/);
    expect(notes).toMatch(/ICC\(1,1\), ICC\(2,1\).* undefined: every score is the same/);
    expect(notes).toMatch(/Kendall's W undefined/);
    expect(notes).toMatch(/Cohen's kappa undefined \(both readers used one category only\) for: R1-R2/);
    expect(hasNonFinite(g)).toBe(false);
  });

  it('no complete case, and a single one', () => {
    const none = agreementByGroup(tidyRows([[1, null], [null, 2]], 'm', 'q'))[0];
    expect(none.used.icc.cases).toBe(0);
    expect(none.notes.join('\n')).toMatch(/no case was scored by every reader/);
    expect(none.notes.join('\n')).toMatch(/no case has two ratings/);
    expect(none.notes.join('\n')).toMatch(/no case in common: R1-R2/);
    const one = agreementByGroup(tidyRows([[1, 2], [null, 2]], 'm', 'q'))[0];
    expect(one.icc['ICC(2,1)'].value).toBeNull();
    expect(one.notes.join('\n')).toMatch(/at least two complete cases/);
    expect(hasNonFinite([none, one])).toBe(false);
  });
});

describe('input checks', () => {
  it('rejects a score outside the scale and a rating given twice, naming case and reader', () => {
    const rows = tidyRows([[1, 2], [2, 2], [3, 3]], 'm', 'q');
    expect(() => agreementByGroup(rows, { scales: { q: { points: 2 } } })).toThrow(
      /case "c03", reader "R1", method "m", question "q": score 3 is outside the scale 1..2/,
    );
    expect(() => agreementByGroup([...rows, { ...rows[0], score: 4 }])).toThrow(/rated more than once/);
    expect(() => agreementByGroup(rows, { bootstrap: -1 })).toThrow(/bootstrap resamples/);
  });
});

describe('formatAgreementTable', () => {
  const report = agreementReport(sets.slice(0, 2).flatMap((s) => tidyRows(s.ratings, 'm', `q-${s.name}`)), { bootstrap: 100 });
  const text = formatAgreementTable(report);

  it('prints every statistic with the JSON values rounded to three decimals, never NaN', () => {
    expect(text).not.toMatch(/NaN|Infinity|undefined/);
    const g = report.groups[0];
    const icc = g.icc['ICC(2,1)'];
    expect(text).toContain(`ICC(2,1)`);
    expect(text).toMatch(new RegExp(`ICC\\(2,1\\)\\s+${fmt3(icc.value)}\\s+\\[${fmt3(icc.ci95![0])}, ${fmt3(icc.ci95![1])}\\]`));
    expect(text).toMatch(new RegExp(`Fleiss' kappa\\s+${fmt3(g.fleiss_kappa.value).replace('-', '\\-')}`));
    for (const label of ["Krippendorff's alpha, ordinal", "Gwet's AC2, quadratic", "Light's kappa, linear", "Kendall's W", 'Percent agreement, within one',
      'ICC two-way ANOVA', "Cohen's kappa, reader pair", 'R1 - R2']) expect(text).toContain(label);
    expect(text).toContain('Missing ratings:');
    expect(text).toMatch(/Landis & Koch \(1977\).*convention/);
  });

  it('says so when there is nothing to show', () => {
    expect(formatAgreementTable({ ...report, groups: [] })).toContain('(no ratings)');
  });

  it('prints a value that rounds to zero as 0.000, not -0.000', () => {
    expect(fmt3(-1e-17)).toBe('0.000');
    expect(fmt3(-0.0004)).toBe('0.000');
    expect(fmt3(-0.0005)).toBe('-0.001');
    expect(fmt3(null)).toBe('n/a');
  });
});
