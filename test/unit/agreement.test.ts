import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { agreementByGroup, formatAgreementTable } from '../../app/stats/agreement.ts';
import type { AgreementGroup } from '../../app/stats/agreement.ts';
import { ICC_FORMS } from '../../app/stats/icc.ts';
import type { IccForm } from '../../app/stats/icc.ts';
import type { TidyRow } from '../../app/report/tidy-csv.ts';

function fixture<T>(name: string): T {
  return JSON.parse(readFileSync(new URL(`../reference/agreement/${name}.json`, import.meta.url), 'utf8')) as T;
}

/** A cases x readers matrix as tidy rows; null cells become absent ratings. */
function toRows(matrix: (number | null)[][], method: string, question: string): TidyRow[] {
  const rows: TidyRow[] = [];
  matrix.forEach((row, i) =>
    row.forEach((score, j) => {
      if (score !== null) {
        rows.push({ case: `c${String(i + 1).padStart(2, '0')}`, reader: `R${j + 1}`, method, question, score });
      }
    }),
  );
  return rows;
}

function hasNonFinite(v: unknown): boolean {
  if (typeof v === 'number') return !Number.isFinite(v);
  if (Array.isArray(v)) return v.some(hasNonFinite);
  if (v && typeof v === 'object') return Object.values(v).some(hasNonFinite);
  return false;
}

const iccRef = fixture<{
  matrix: (number | null)[][];
  cases: number;
  forms: Record<IccForm, { value: number; ci95: [number, number] }>;
}>('icc-random-likert');
const kappaRef = fixture<{ ratings: (number | null)[][]; subjects: number; kappa: number }>('fleiss-random');

describe('agreementByGroup against the reference libraries', () => {
  const rows = [
    ...toRows(iccRef.matrix, 'm-iterative', 'sharpness'),
    ...toRows(kappaRef.ratings, 'm-zerofill', 'noise'),
  ];
  const groups = agreementByGroup(rows);

  it('makes one group per method and question, sorted', () => {
    expect(groups.map((g) => [g.method, g.question])).toEqual([
      ['m-iterative', 'sharpness'],
      ['m-zerofill', 'noise'],
    ]);
  });

  it('ICCs of the Likert table equal psych::ICC on its complete cases', () => {
    // Source: R psych::ICC, test/reference/agreement/icc-random-likert.json.
    const g = groups[0];
    expect(g.cases).toBe(40);
    expect(g.readers).toBe(5);
    expect(g.ratings).toBe(197);
    expect(g.completeCases).toBe(iccRef.cases);
    expect(g.missing).toBe('complete cases');
    for (const form of ICC_FORMS) {
      expect(Math.abs((g.icc[form].value as number) - iccRef.forms[form].value), form).toBeLessThan(1e-9);
      const ci = g.icc[form].ci95 as [number, number];
      expect(Math.abs(ci[0] - iccRef.forms[form].ci95[0]), form).toBeLessThan(1e-8);
      expect(Math.abs(ci[1] - iccRef.forms[form].ci95[1]), form).toBeLessThan(1e-8);
    }
    expect(g.notes).toEqual(['3 of 40 cases lack a rating from some reader and were left out (complete cases)']);
  });

  it("Fleiss' kappa of the random ratings equals statsmodels on its complete cases", () => {
    // Source: statsmodels fleiss_kappa, test/reference/agreement/fleiss-random.json.
    const g = groups[1];
    expect(g.fleiss.subjects).toBe(kappaRef.subjects);
    expect(Math.abs((g.fleiss.kappa as number) - kappaRef.kappa)).toBeLessThan(1e-12);
    expect(g.fleiss.categories).toEqual([1, 2, 3, 4, 5]);
  });

  it('filters by method and question', () => {
    expect(agreementByGroup(rows, { method: 'm-zerofill' }).map((g) => g.method)).toEqual(['m-zerofill']);
    expect(agreementByGroup(rows, { question: 'sharpness' }).map((g) => g.question)).toEqual(['sharpness']);
    expect(agreementByGroup(rows, { method: 'm-zerofill', question: 'sharpness' })).toEqual([]);
  });

  it('is JSON-safe', () => {
    expect(hasNonFinite(groups)).toBe(false);
    expect(JSON.parse(JSON.stringify(groups))).toEqual(groups);
  });
});

describe('agreementByGroup: Shrout & Fleiss (1979) Table 2 as tidy rows', () => {
  it('reproduces ICC(2,1) = .29 and ICC(3,1) = .71', () => {
    // Source: Shrout & Fleiss (1979), Psychological Bulletin 86:420-428, Table 2 data and published ICCs.
    const sf = [
      [9, 2, 5, 8],
      [6, 1, 3, 2],
      [8, 4, 6, 8],
      [7, 1, 2, 6],
      [10, 5, 6, 9],
      [6, 2, 4, 7],
    ];
    const [g] = agreementByGroup(toRows(sf, 'm', 'q'));
    expect(g.icc['ICC(2,1)'].value).toBeCloseTo(0.29, 2);
    expect(g.icc['ICC(3,1)'].value).toBeCloseTo(0.71, 2);
    expect(g.notes).toEqual([]);
  });
});

describe('agreementByGroup: undefined values become null with a reason', () => {
  it('one reader', () => {
    const [g] = agreementByGroup(toRows([[1], [2], [3]], 'm', 'q'));
    expect(g.readers).toBe(1);
    expect(g.fleiss.kappa).toBeNull();
    for (const form of ICC_FORMS) expect(g.icc[form]).toEqual({ value: null, ci95: null });
    expect(g.notes.join(' ')).toMatch(/only one reader \(R1\)/);
  });

  it('every score equal', () => {
    const [g] = agreementByGroup(toRows([[3, 3], [3, 3], [3, 3]], 'm', 'q'));
    expect(g.fleiss.kappa).toBeNull();
    for (const form of ICC_FORMS) expect(g.icc[form].value).toBeNull();
    expect(g.notes.join('\n')).toMatch(/Fleiss' kappa undefined: every rating falls in one category/);
    expect(g.notes.join('\n')).toMatch(/ICC\(1,1\), ICC\(2,1\).* undefined: every score is the same/);
    expect(hasNonFinite(g)).toBe(false);
  });

  it('readers agree exactly: ICC 1 but intervals undefined, said so', () => {
    const [g] = agreementByGroup(toRows([[1, 1], [2, 2], [4, 4]], 'm', 'q'));
    expect(g.icc['ICC(2,1)'].value).toBe(1);
    expect(g.icc['ICC(1,1)'].ci95).toBeNull();
    expect(g.fleiss.kappa).toBe(1);
    expect(g.notes.join('\n')).toMatch(/95% CI undefined/);
    expect(hasNonFinite(g)).toBe(false);
  });

  it('no complete case, and a single complete case', () => {
    const none = agreementByGroup(toRows([[1, null], [null, 2]], 'm', 'q'))[0];
    expect(none.completeCases).toBe(0);
    expect(none.notes.join('\n')).toMatch(/no case was rated by every reader/);
    const one = agreementByGroup(toRows([[1, 2], [null, 2]], 'm', 'q'))[0];
    expect(one.completeCases).toBe(1);
    expect(one.icc['ICC(2,1)'].value).toBeNull();
    expect(one.notes.join('\n')).toMatch(/at least two complete cases/);
  });
});

describe('agreementByGroup: input checks and scales', () => {
  it('takes kappa categories from the scale and rejects scores outside it', () => {
    const rows = toRows([[1, 2], [2, 2], [3, 3]], 'm', 'q');
    const [g] = agreementByGroup(rows, { scales: { q: { points: 5 } } });
    expect(g.fleiss.categories).toEqual([1, 2, 3, 4, 5]);
    expect(g.fleiss.kappa).toBeCloseTo(agreementByGroup(rows)[0].fleiss.kappa as number, 12);
    expect(() => agreementByGroup(rows, { scales: { q: { points: 2 } } })).toThrow(
      /case "c03", reader "R1", method "m", question "q": score 3 is outside the scale 1..2/,
    );
  });

  it('rejects a rating given twice', () => {
    const rows = toRows([[1, 2], [2, 2]], 'm', 'q');
    expect(() => agreementByGroup([...rows, { ...rows[0], score: 4 }])).toThrow(/rated more than once/);
  });
});

describe('formatAgreementTable', () => {
  const sample: AgreementGroup[] = [
    ...agreementByGroup(toRows(iccRef.matrix, 'm-iterative', 'sharpness')),
    ...agreementByGroup(toRows([[1], [2]], 'm-single-reader-method', 'q')),
  ];
  const text = formatAgreementTable(sample);
  const lines = text.split('\n');

  it('prints an aligned table with n/a, never NaN, and the notes', () => {
    expect(lines[0]).toMatch(/^method\s+question\s+cases\s+readers\s+Fleiss kappa\s+ICC\(2,1\) \[95% CI\]$/);
    expect(lines[1]).toMatch(/^-+( +-+){5}$/);
    expect(text).not.toMatch(/NaN|Infinity|undefined/);
    // The ICC column starts at the same place on every row.
    const icc = sample[0].icc['ICC(2,1)'];
    const cell = `${icc.value?.toFixed(3)} [${icc.ci95?.[0].toFixed(3)}, ${icc.ci95?.[1].toFixed(3)}]`;
    expect(lines[2].endsWith(cell)).toBe(true);
    expect(lines[2]).toContain('37/40');
    expect(lines[3]).toMatch(/^m-single-reader-method\s+q\s+2\s+1\s+n\/a\s+n\/a$/);
    expect(lines[0].indexOf('question')).toBe(lines[3].indexOf('q '));
    expect(text).toContain('m-single-reader-method / q: only one reader (R1)');
  });

  it('says so when there is nothing to show', () => {
    expect(formatAgreementTable([])).toContain('(no ratings)');
  });
});
