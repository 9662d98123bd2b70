import { mkdtempSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { loadTemplate, parseTemplate } from '../../app/study/parse-template.ts';
import { TemplateError } from '../../app/study/template.ts';
import type { TemplateIssue } from '../../app/study/template.ts';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const FILE = '/studies/phantom/invented.study.yaml';

/** A valid template; line N of the text is BASE[N - 1]. */
const BASE = [
  'title: Invented phantom study', // 1
  'seed: 7', // 2
  'sources: ../data/phantoms', // 3
  'methods:', // 4
  '  - id: m-a', // 5
  '    label: Method A', // 6
  '    path: "{case}/a.npy"', // 7
  '  - id: m-b', // 8
  '    label: Method B', // 9
  '    path: "{case}/b.npy"', // 10
  'cases: auto', // 11
  'questions:', // 12
  '  - id: sharpness', // 13
  '    text: How sharp are the edges?', // 14
  '    scale: {points: 5, low: Blurred, high: Crisp}', // 15
  '    labels: {1: Poor, 5: Excellent}', // 16
  'readers: [R1, R2]', // 17
  'design:', // 18
  '  presentation: side-by-side', // 19
  '  sessions: 2', // 20
  '  washout_days: 7', // 21
];

/** BASE with lines replaced (a string, possibly several lines) or removed (null). */
function edit(changes: Record<number, string | null>): string {
  return BASE.flatMap((line, i) => {
    const change = changes[i + 1];
    return change === undefined ? [line] : change === null ? [] : [change];
  }).join('\n');
}

function issuesOf(text: string, file = FILE): TemplateIssue[] {
  try {
    parseTemplate(text, file);
  } catch (e) {
    if (e instanceof TemplateError) return e.issues;
    throw e;
  }
  throw new Error('expected a TemplateError');
}

/** The one issue of a text, without the file. */
function onlyIssue(text: string): Omit<TemplateIssue, 'file'> {
  const issues = issuesOf(text);
  expect(issues).toHaveLength(1);
  const { file, ...rest } = issues[0];
  expect(file).toBe(FILE);
  return rest;
}

describe('parseTemplate on valid templates', () => {
  it('returns the template with absolute file and sources', () => {
    const t = parseTemplate(BASE.join('\n'), FILE);
    expect(t).toEqual({
      file: FILE,
      title: 'Invented phantom study',
      seed: 7,
      sources: '/studies/data/phantoms',
      methods: [
        { id: 'm-a', label: 'Method A', path: '{case}/a.npy' },
        { id: 'm-b', label: 'Method B', path: '{case}/b.npy' },
      ],
      cases: 'auto',
      questions: [
        {
          id: 'sharpness',
          text: 'How sharp are the edges?',
          scale: { points: 5, low: 'Blurred', high: 'Crisp' },
          labels: { 1: 'Poor', 5: 'Excellent' },
        },
      ],
      readers: ['R1', 'R2'],
      design: { presentation: 'side-by-side', sessions: 2, washout_days: 7 },
      calibration: [],
    });
    expect(Object.keys(t.questions[0].labels)).toEqual(['1', '5']);
  });

  it('fills defaults for design and labels', () => {
    const t = parseTemplate(edit({ 16: null, 18: null, 19: null, 20: null, 21: null }), FILE);
    expect(t.design).toEqual({ presentation: 'single', sessions: 1, washout_days: 0 });
    expect(t.questions[0].labels).toEqual({});
    const partial = parseTemplate(edit({ 19: null, 21: null }), FILE);
    expect(partial.design).toEqual({ presentation: 'single', sessions: 2, washout_days: 0 });
  });

  it('resolves a relative template path from the working folder and keeps reference as a pattern under sources', () => {
    const text = edit({ 3: 'sources: cases\nreference: "{case}/truth.npy"', 11: 'cases: [p-01, p-02]' });
    const t = parseTemplate(text, 'studies/x.study.yaml');
    expect(t.file).toBe(resolve('studies/x.study.yaml'));
    expect(t.sources).toBe(resolve('studies/cases'));
    expect(t.reference).toBe('{case}/truth.npy');
    expect(t.cases).toEqual(['p-01', 'p-02']);
  });

  it('allows a method path without {case} when the cases are listed', () => {
    expect(parseTemplate(edit({ 7: '    path: shared.npy', 11: 'cases: [p-01]' }), FILE).methods[0].path).toBe('shared.npy');
  });

  it('accepts a display section (defaults filled) and a free-form analysis section', () => {
    const t = parseTemplate(`${BASE.join('\n')}\ndisplay: {matching: reference-grid}\nanalysis: {anything: goes}`, FILE);
    expect(t.display).toEqual({ matching: 'reference-grid', intensity: 'percentile', percentiles: [0, 99.5], presets: [] });
  });

  it('reads the example knee phantom template', () => {
    const path = join(ROOT, 'study-templates/knee-phantom.study.yaml');
    const t = loadTemplate(path);
    expect(t.file).toBe(path);
    expect(t.sources).toBe(resolve(dirname(path), '../data/knee-phantom'));
    expect(t.methods).toHaveLength(3);
    expect(t.questions.map((q) => q.id)).toEqual(['sharpness', 'artifacts', 'confidence']);
    expect(t.questions.every((q) => q.scale.points === 5)).toBe(true);
    expect(t.readers).toEqual(['R1', 'R2', 'R3']);
    expect(t.design).toEqual({ presentation: 'single', sessions: 2, washout_days: 14 });
  });
});

describe('parseTemplate reports each kind of error with file, line, column and key', () => {
  it('YAML syntax errors, and nothing else', () => {
    expect(onlyIssue(edit({ 17: 'readers: [R1, R2' }))).toEqual({
      line: 18,
      column: 1,
      key: '',
      message: expect.stringMatching(/^invalid YAML: .*\]/),
    });
    expect(onlyIssue(edit({ 2: 'seed: 7\ntitle: Again' }))).toEqual({
      line: 3,
      column: 1,
      key: '',
      message: 'invalid YAML: Map keys must be unique',
    });
  });

  it('a missing required key, at the line of its parent', () => {
    expect(onlyIssue(edit({ 2: null }))).toEqual({
      line: 1,
      column: 1,
      key: 'seed',
      message: `missing required key 'seed'; expected a whole number from 0 to ${Number.MAX_SAFE_INTEGER}`,
    });
    expect(onlyIssue(edit({ 15: '    scale: {points: 5, low: Blurred}' }))).toEqual({
      line: 15,
      column: 5,
      key: 'questions[0].scale.high',
      message: "missing required key 'high'; expected non-empty text (the name of the top point)",
    });
  });

  it('a wrong type, with a hint to quote numbers meant as text', () => {
    expect(onlyIssue(edit({ 2: 'seed: many' }))).toEqual({
      line: 2,
      column: 7,
      key: 'seed',
      message: `must be a whole number from 0 to ${Number.MAX_SAFE_INTEGER}, got 'many'`,
    });
    expect(onlyIssue(edit({ 17: 'readers: [R1, 007]' })).message).toBe(
      'must be a reader code of letters, digits, _ and -, starting with a letter or digit (e.g. R1), got 7 ' +
        '(write it in quotes to keep it as text: "007")',
    );
    expect(onlyIssue(edit({ 11: 'cases: everything' }))).toMatchObject({
      line: 11,
      key: 'cases',
      message: "must be 'auto' or a non-empty list of case folder names, got 'everything'",
    });
  });

  it('a value out of range', () => {
    expect(onlyIssue(edit({ 15: '    scale: {points: 12, low: Blurred, high: Crisp}' }))).toEqual({
      line: 15,
      column: 21,
      key: 'questions[0].scale.points',
      message: 'must be an integer from 2 to 11, got 12',
    });
    expect(onlyIssue(edit({ 8: null, 9: null, 10: null }))).toMatchObject({
      line: 5,
      key: 'methods',
      message: 'must be a list of at least 2 methods, got a list of 1 item',
    });
  });

  it('an unknown key, listing the allowed ones', () => {
    expect(onlyIssue(edit({ 20: '  sesions: 2' }))).toEqual({
      line: 20,
      column: 3,
      key: 'design.sesions',
      message: "unknown key 'sesions'; allowed: presentation, sessions, washout_days, revisits",
    });
    expect(onlyIssue(`${BASE.join('\n')}\nreviewers: [R3]`)).toMatchObject({ line: 22, key: 'reviewers' });
  });

  it('a duplicate id, naming the line of the first', () => {
    expect(onlyIssue(edit({ 8: '  - id: m-a' }))).toEqual({
      line: 8,
      column: 9,
      key: 'methods[1].id',
      message: "duplicate method id 'm-a' (first at line 5)",
    });
    expect(onlyIssue(edit({ 17: 'readers:\n  - R1\n  - R2\n  - R1' }))).toEqual({
      line: 20,
      column: 5,
      key: 'readers[2]',
      message: "duplicate reader 'R1' (first at line 18)",
    });
  });

  it('a label key outside the scale', () => {
    expect(onlyIssue(edit({ 16: '    labels: {1: Poor, 7: Excellent}' }))).toEqual({
      line: 16,
      column: 23,
      key: 'questions[0].labels.7',
      message: "label key '7' must be a whole number from 1 to 5 (the scale points)",
    });
    expect(onlyIssue(edit({ 16: '    labels: {top: Excellent}' })).message).toBe(
      "label key 'top' must be a whole number from 1 to 5 (the scale points)",
    );
  });

  it('a method path without {case} when cases is auto', () => {
    expect(onlyIssue(edit({ 10: '    path: b.npy' }))).toEqual({
      line: 10,
      column: 11,
      key: 'methods[1].path',
      message: `must contain {case} when cases is 'auto' (each case folder needs its own file), got 'b.npy'; e.g. "{case}/b.npy"`,
    });
    expect(issuesOf(edit({ 7: '    path: "{cse}/a.npy"' })).map((i) => [i.line, i.key, i.message])).toEqual([
      [7, 'methods[0].path', "unknown placeholder '{cse}' in '{cse}/a.npy'; the only placeholder is {case}"],
      [7, 'methods[0].path', expect.stringMatching(/^must contain \{case\} when cases is 'auto'/)],
    ]);
  });

  it('several errors at once, in line order, in the error message too', () => {
    const text = edit({
      2: 'seed: -1',
      8: '  - id: m-a',
      15: '    scale: {points: 1, low: Blurred, high: Crisp}',
      20: '  sesions: 2',
    });
    const issues = issuesOf(text, 'studies/broken.study.yaml');
    expect(issues.map((i) => [i.line, i.key])).toEqual([
      [2, 'seed'],
      [8, 'methods[1].id'], // found after the schema's errors, reported in line order
      [15, 'questions[0].scale.points'],
      [20, 'design.sesions'],
    ]);
    expect(issues.every((i) => i.file === 'studies/broken.study.yaml')).toBe(true);
    let message = '';
    try {
      parseTemplate(text, 'studies/broken.study.yaml');
    } catch (e) {
      message = (e as Error).message;
    }
    expect(message.split('\n')).toHaveLength(4);
    expect(message).toContain('studies/broken.study.yaml:15:21: questions[0].scale.points: must be an integer from 2 to 11, got 1');
  });

  it('one message per bad value, even when it breaks several rules', () => {
    expect(onlyIssue(edit({ 19: '  presentation: 3' }))).toEqual({
      line: 19,
      column: 17,
      key: 'design.presentation',
      message: 'must be one of: single, side-by-side, got 3 (write it in quotes to keep it as text: "3")',
    });
  });

  it('an alias is located where it is used; a byte order mark does not shift columns', () => {
    const aliased = edit({ 5: '  - &first', 6: '    id: m-a\n    label: Method A\n    path: "{case}/a.npy"', 7: null, 8: '  - *first', 9: null, 10: null });
    expect(onlyIssue(aliased)).toMatchObject({ line: 9, column: 5, key: 'methods[1].id', message: "duplicate method id 'm-a' (first at line 6)" });
    expect(onlyIssue(`\uFEFF${edit({ 2: 'seed: many' })}`)).toMatchObject({ line: 2, column: 7, key: 'seed' });
  });

  it('an empty file or a document that is not a mapping', () => {
    expect(onlyIssue('# nothing yet\n').message).toMatch(/^must be a mapping with the keys title, seed, .*got nothing$/);
    expect(onlyIssue('- a\n- b\n')).toMatchObject({ line: 1, key: '', message: expect.stringMatching(/got a list of 2 items$/) });
  });
});

describe('loadTemplate', () => {
  it('names a missing file', () => {
    const dir = mkdtempSync(join(tmpdir(), 'veil-template-'));
    const missing = join(dir, 'absent.study.yaml');
    expect(() => loadTemplate(missing)).toThrow(TemplateError);
    expect(() => loadTemplate(missing)).toThrow(`${missing}: file not found; expected a study template (*.study.yaml)`);
    mkdirSync(join(dir, 'folder.study.yaml'));
    expect(() => loadTemplate(join(dir, 'folder.study.yaml'))).toThrow('is a folder');
  });
});
