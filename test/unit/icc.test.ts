import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ICC_FORMS, fUpperTail, icc } from '../../app/stats/icc.ts';
import type { IccForm } from '../../app/stats/icc.ts';

interface IccFixture {
  generator: string;
  matrix: (number | null)[][];
  cases: number;
  readers: number;
  anova: { BMS: number; WMS: number; JMS: number; EMS: number; dfB: number; dfJ: number; dfE: number; SSB: number; SSJ: number; SSE: number };
  forms: Record<IccForm, { value: number; F: number; df1: number; df2: number; p: number; ci95: [number, number] }>;
}

function fixture(name: string): IccFixture {
  return JSON.parse(readFileSync(new URL(`../reference/agreement/${name}.json`, import.meta.url), 'utf8')) as IccFixture;
}

// psych::ICC prints 15 significant digits; our arithmetic differs from R's only in rounding.
const TOL = 1e-9;

function expectMatchesPsych(ref: IccFixture): void {
  const r = icc(ref.matrix);
  expect(ref.generator).toMatch(/psych 2\./);
  expect(r.cases).toBe(ref.cases);
  expect(r.readers).toBe(ref.readers);
  expect(r.anova.betweenCases.ms).toBeCloseTo(ref.anova.BMS, 9);
  expect(r.anova.withinCases.ms).toBeCloseTo(ref.anova.WMS, 9);
  expect(r.anova.betweenReaders.ms).toBeCloseTo(ref.anova.JMS, 9);
  expect(r.anova.residual.ms).toBeCloseTo(ref.anova.EMS, 9);
  expect(r.anova.betweenCases.ss).toBeCloseTo(ref.anova.SSB, 9);
  expect(r.anova.betweenReaders.ss).toBeCloseTo(ref.anova.SSJ, 9);
  expect(r.anova.residual.ss).toBeCloseTo(ref.anova.SSE, 9);
  expect([r.anova.betweenCases.df, r.anova.betweenReaders.df, r.anova.residual.df]).toEqual([
    ref.anova.dfB,
    ref.anova.dfJ,
    ref.anova.dfE,
  ]);
  for (const form of ICC_FORMS) {
    const got = r.forms[form];
    const want = ref.forms[form];
    expect(Math.abs(got.value - want.value), `${form} value`).toBeLessThan(TOL);
    expect(Math.abs(got.F - want.F), `${form} F`).toBeLessThan(TOL * Math.max(1, want.F));
    expect([got.df1, got.df2], `${form} df`).toEqual([want.df1, want.df2]);
    expect(Math.abs(got.p - want.p), `${form} p`).toBeLessThan(TOL);
    // The intervals rest on F quantiles: @stdlib against R's qf, agreement to 1e-8.
    expect(Math.abs(got.ci95[0] - want.ci95[0]), `${form} lower bound`).toBeLessThan(1e-8);
    expect(Math.abs(got.ci95[1] - want.ci95[1]), `${form} upper bound`).toBeLessThan(1e-8);
  }
}

describe('icc: Shrout & Fleiss (1979) Table 2', () => {
  const sf = [
    [9, 2, 5, 8],
    [6, 1, 3, 2],
    [8, 4, 6, 8],
    [7, 1, 2, 6],
    [10, 5, 6, 9],
    [6, 2, 4, 7],
  ];

  it('reproduces the published ICCs to the two decimals printed in the paper', () => {
    // Source: Shrout & Fleiss (1979), Psychological Bulletin 86:420-428, values given for Table 2's data:
    // ICC(1,1)=.17, ICC(2,1)=.29, ICC(3,1)=.71, ICC(1,4)=.44, ICC(2,4)=.62, ICC(3,4)=.91.
    const r = icc(sf);
    const published: Record<IccForm, number> = {
      'ICC(1,1)': 0.17,
      'ICC(2,1)': 0.29,
      'ICC(3,1)': 0.71,
      'ICC(1,k)': 0.44,
      'ICC(2,k)': 0.62,
      'ICC(3,k)': 0.91,
    };
    for (const form of ICC_FORMS) {
      expect(Math.abs(r.forms[form].value - published[form]), form).toBeLessThanOrEqual(0.005);
    }
    expect(r.cases).toBe(6);
    expect(r.readers).toBe(4);
    expect(r.dropped).toBe(0);
  });

  it('matches psych::ICC on the same table, intervals and F tests included', () => {
    // Source: test/reference/agreement/icc-shrout-fleiss-1979.json, made by make-fixtures.R with R psych::ICC.
    expectMatchesPsych(fixture('icc-shrout-fleiss-1979'));
  });
});

describe('icc: random tables against psych::ICC', () => {
  it('a 40 x 5 Likert table with three incomplete rows (complete cases)', () => {
    // Source: test/reference/agreement/icc-random-likert.json (R psych::ICC on na.omit of the table).
    const ref = fixture('icc-random-likert');
    expectMatchesPsych(ref);
    expect(icc(ref.matrix).dropped).toBe(3);
  });

  it('a 25 x 3 continuous table with weak agreement', () => {
    // Source: test/reference/agreement/icc-random-continuous.json (R psych::ICC).
    expectMatchesPsych(fixture('icc-random-continuous'));
  });
});

describe('icc: shape and edge cases', () => {
  it('treats null and NaN as missing and drops the row', () => {
    const r = icc([
      [1, 2],
      [null, 3],
      [2, Number.NaN],
      [3, 3],
      [5, 4],
    ]);
    expect(r.cases).toBe(3);
    expect(r.dropped).toBe(2);
    const same = icc([
      [1, 2],
      [3, 3],
      [5, 4],
    ]);
    expect(r.forms['ICC(2,1)'].value).toBe(same.forms['ICC(2,1)'].value);
  });

  it('gives ICC 1 when readers agree exactly and cases differ', () => {
    const r = icc([
      [1, 1, 1],
      [2, 2, 2],
      [4, 4, 4],
    ]);
    for (const form of ICC_FORMS) expect(r.forms[form].value, form).toBe(1);
    expect(r.forms['ICC(3,1)'].p).toBe(0);
  });

  it('gives NaN, not a number, when every score is equal', () => {
    const r = icc([
      [3, 3],
      [3, 3],
      [3, 3],
    ]);
    expect(Number.isNaN(r.forms['ICC(2,1)'].value)).toBe(true);
  });

  it('refuses fewer than two readers or two complete cases, and ragged rows', () => {
    expect(() => icc([[1], [2], [3]])).toThrow(/two readers/);
    expect(() => icc([[1, 2], [null, 3]])).toThrow(/two complete cases/);
    expect(() => icc([[1, 2], [3]])).toThrow(/case 2 has 1 values/);
  });
});

describe('fUpperTail', () => {
  it('matches R pf(..., lower.tail = FALSE) as recorded by psych', () => {
    // Source: the p column of psych::ICC in icc-shrout-fleiss-1979.json (R's pf).
    const ref = fixture('icc-shrout-fleiss-1979').forms['ICC(1,1)'];
    expect(fUpperTail(ref.F, ref.df1, ref.df2)).toBeCloseTo(ref.p, 12);
    expect(fUpperTail(0, 3, 4)).toBe(1);
    expect(fUpperTail(Number.POSITIVE_INFINITY, 3, 4)).toBe(0);
  });
});
