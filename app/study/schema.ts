/**
 * JSON Schema (draft-07) of the Veil study template (`*.study.yaml`), checked with ajv.
 *
 * Every subschema that can reject a value carries an `expected` annotation: a short phrase saying
 * what a valid value looks like. The template parser turns ajv's errors into messages of the form
 * "must be <expected>, got <value>", so the schema is the one place that says what is allowed.
 * `expected` is an annotation only (it validates nothing); register it with ajv under
 * EXPECTED_KEYWORD. Defaults (design, labels) are filled by ajv's `useDefaults`.
 *
 * Rules that JSON Schema cannot express (unique method and question ids, label keys within the
 * scale, `{case}` in method paths when cases is 'auto') live in ./parse-template.ts.
 */
import type { SchemaObject } from 'ajv';

export const EXPECTED_KEYWORD = 'expected';

/** Method and question ids: they name columns in results and reports. */
export const ID_PATTERN = '^[a-z0-9][a-z0-9-]*$';
/** Reader codes: they name kit folders, so no spaces or path characters. */
export const READER_PATTERN = '^[A-Za-z0-9][A-Za-z0-9_-]*$';
/** A case is one folder name under `sources`: no slashes, not `.` or `..`. */
export const CASE_PATTERN = '^(?!\\.\\.?$)[^/\\\\]+$';

export const MIN_POINTS = 2;
export const MAX_POINTS = 11;

const text = (what: string): SchemaObject => ({ type: 'string', minLength: 1, expected: what });

const id = (example: string): SchemaObject => ({
  type: 'string',
  pattern: ID_PATTERN,
  expected: `an id of lowercase letters, digits and hyphens, starting with a letter or digit (e.g. '${example}')`,
});

const method: SchemaObject = {
  type: 'object',
  expected: 'a method with the keys id, label and path',
  required: ['id', 'label', 'path'],
  additionalProperties: false,
  properties: {
    id: id('m-zerofill'),
    label: text('non-empty text (the method name; shown to the coordinator only)'),
    path: text('a file or folder path relative to sources, with {case} for the case folder (e.g. "{case}/zerofill.npy")'),
  },
};

const CASES_EXPECTED = "'auto' or a non-empty list of case folder names";

const cases: SchemaObject = {
  expected: CASES_EXPECTED,
  if: { type: 'string' },
  then: { const: 'auto', expected: CASES_EXPECTED },
  else: {
    type: 'array',
    expected: CASES_EXPECTED,
    minItems: 1,
    uniqueItems: true,
    items: {
      type: 'string',
      pattern: CASE_PATTERN,
      expected: "a case folder name under sources (no slashes, not '.' or '..')",
    },
  },
};

const question: SchemaObject = {
  type: 'object',
  expected: 'a question with the keys id, text and scale (labels optional)',
  required: ['id', 'text', 'scale'],
  additionalProperties: false,
  properties: {
    id: id('sharpness'),
    text: text('non-empty text (the question as the reader sees it)'),
    scale: {
      type: 'object',
      expected: 'a Likert scale with the keys points, low and high',
      required: ['points', 'low', 'high'],
      additionalProperties: false,
      properties: {
        points: {
          type: 'integer',
          minimum: MIN_POINTS,
          maximum: MAX_POINTS,
          expected: `an integer from ${MIN_POINTS} to ${MAX_POINTS}`,
        },
        low: text('non-empty text (the name of point 1)'),
        high: text('non-empty text (the name of the top point)'),
      },
    },
    labels: {
      type: 'object',
      expected: 'a mapping from scale point to its name, e.g. {1: Non-diagnostic, 5: Excellent}',
      default: {},
      additionalProperties: text('non-empty text (the name of that point)'),
    },
  },
};

const design: SchemaObject = {
  type: 'object',
  expected: 'a mapping with the keys presentation, sessions and washout_days',
  default: {},
  additionalProperties: false,
  properties: {
    presentation: {
      type: 'string',
      enum: ['single', 'side-by-side'],
      default: 'single',
      expected: 'one of: single, side-by-side',
    },
    sessions: { type: 'integer', minimum: 1, default: 1, expected: 'an integer of at least 1' },
    washout_days: { type: 'integer', minimum: 0, default: 0, expected: 'an integer of at least 0' },
  },
};

export const REQUIRED_KEYS = ['title', 'seed', 'sources', 'methods', 'cases', 'questions', 'readers'] as const;

export const templateSchema: SchemaObject = {
  $schema: 'http://json-schema.org/draft-07/schema#',
  title: 'Veil study template',
  type: 'object',
  expected:
    'a mapping with the keys title, seed, sources, methods, cases, questions, readers ' +
    '(optional: reference, design, display, analysis)',
  required: [...REQUIRED_KEYS],
  additionalProperties: false,
  properties: {
    title: text('non-empty text (the study title)'),
    seed: {
      type: 'integer',
      minimum: 0,
      maximum: Number.MAX_SAFE_INTEGER,
      expected: `a whole number from 0 to ${Number.MAX_SAFE_INTEGER}`,
    },
    sources: text('a folder path, relative to the template file'),
    reference: text('a file or folder path relative to sources, with {case} for the case folder (e.g. "{case}/reference")'),
    methods: { type: 'array', minItems: 2, expected: 'a list of at least 2 methods', items: method },
    cases,
    questions: { type: 'array', minItems: 1, expected: 'a list of at least 1 question', items: question },
    readers: {
      type: 'array',
      minItems: 1,
      uniqueItems: true,
      expected: 'a non-empty list of reader codes, e.g. [R1, R2, R3]',
      items: {
        type: 'string',
        pattern: READER_PATTERN,
        expected: 'a reader code of letters, digits, _ and -, starting with a letter or digit (e.g. R1)',
      },
    },
    design,
    display: { type: 'object', expected: 'a mapping (display settings)' },
    analysis: { type: 'object', expected: 'a mapping (analysis settings)' },
  },
};
