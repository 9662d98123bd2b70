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

/** likert: one image on a scale; yes-no: scored 1 = no, 2 = yes; comparative: two images side by side. */
export const QUESTION_TYPES = ['likert', 'yes-no', 'comparative'] as const;

const question: SchemaObject = {
  type: 'object',
  expected: 'a question with the keys id, text and scale (optional: type, labels, required, comment; a yes-no question has no scale)',
  // `scale` is required for likert and comparative questions: checked in ./parse-template.ts.
  required: ['id', 'text'],
  additionalProperties: false,
  properties: {
    id: id('sharpness'),
    text: text('non-empty text (the question as the reader sees it)'),
    type: { type: 'string', enum: [...QUESTION_TYPES], expected: `one of: ${QUESTION_TYPES.join(', ')}` },
    required: { type: 'boolean', expected: 'true or false (whether the reader must answer before moving on; default true)' },
    comment: { type: 'boolean', expected: 'true or false (whether the reader may add a free-text comment; default false)' },
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
  expected: 'a mapping with the keys presentation, sessions, washout_days and revisits',
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
    revisits: { type: 'boolean', expected: 'true or false (whether a reader may go back and change answers of the current session; default false)' },
  },
};

const pixelCount = (what: string): SchemaObject => ({ type: 'integer', minimum: 0, maximum: 100000, expected: `a whole number of pixels (${what})` });

/** Rectangles blacked out in every slice where a source may show identifying text (DICOM PS3.15 Annex E, Clean Pixel Data). */
const burnedIn: SchemaObject = {
  type: 'object',
  additionalProperties: false,
  expected: 'a mapping with apply (when-stated, always or never) and regions',
  properties: {
    apply: {
      type: 'string',
      enum: ['when-stated', 'always', 'never'],
      default: 'when-stated',
      expected: 'one of: when-stated (black out the regions in series whose BurnedInAnnotation is YES), always, never (you have checked there is no burned-in text)',
    },
    regions: {
      type: 'array',
      default: [],
      expected: 'a list of rectangles {x, y, width, height} in pixels from the top-left corner, blacked out on every slice',
      items: {
        type: 'object',
        additionalProperties: false,
        required: ['x', 'y', 'width', 'height'],
        expected: 'a rectangle {x, y, width, height} in pixels',
        properties: { x: pixelCount('column of the left edge'), y: pixelCount('row of the top edge'), width: pixelCount('width'), height: pixelCount('height') },
      },
    },
  },
};

/** How methods of different matrix sizes are brought onto one grid for display (design.md, "Display policy"). */
export const MATCHING_POLICIES = ['none', 'reference-grid'] as const;
/** How intensities are normalized for display (design.md, "Display policy"). */
export const INTENSITY_POLICIES = ['none', 'percentile', 'match-reference'] as const;

const display: SchemaObject = {
  type: 'object',
  expected: 'a mapping with the keys matching, intensity, percentiles and presets (all optional)',
  additionalProperties: false,
  properties: {
    matching: {
      type: 'string',
      enum: [...MATCHING_POLICIES],
      default: 'none',
      expected:
        'one of: none (every image keeps its own matrix), reference-grid (every method is resampled in-plane, ' +
        "with linear interpolation, to the reference's rows and columns, or the first method's when there is no reference)",
    },
    intensity: {
      type: 'string',
      enum: [...INTENSITY_POLICIES],
      default: 'percentile',
      expected:
        "one of: none (one window per case, the reference's, for every method), percentile (each image scaled " +
        'from its own low to high percentile), match-reference (each method mapped linearly onto the reference by a ' +
        "least-squares fit, then shown in the reference's window; needs a reference)",
    },
    percentiles: {
      type: 'array',
      minItems: 2,
      maxItems: 2,
      default: [0, 99.5],
      expected: 'two percentiles [low, high] from 0 to 100, low below high (e.g. [0, 99.5])',
      items: { type: 'number', minimum: 0, maximum: 100, expected: 'a percentile from 0 to 100' },
    },
    presets: {
      type: 'array',
      default: [],
      maxItems: 9,
      expected: 'a list of up to 9 window presets, each {name, low, high}',
      items: {
        type: 'object',
        additionalProperties: false,
        required: ['name', 'low', 'high'],
        expected: 'a window preset {name, low, high}: low and high in percent of the default window (0 its black, 100 its white)',
        properties: {
          name: { type: 'string', minLength: 1, maxLength: 40, expected: 'a short name shown to readers, e.g. Soft' },
          low: { type: 'number', minimum: -100, maximum: 1000, expected: 'a percent of the default window from -100 to 1000' },
          high: { type: 'number', minimum: -100, maximum: 1000, expected: 'a percent of the default window from -100 to 1000' },
        },
      },
    },
  },
};

export const REQUIRED_KEYS = ['title', 'seed', 'sources', 'methods', 'cases', 'questions', 'readers'] as const;

export const templateSchema: SchemaObject = {
  $schema: 'http://json-schema.org/draft-07/schema#',
  title: 'Veil study template',
  type: 'object',
  expected:
    'a mapping with the keys title, seed, sources, methods, cases, questions, readers ' +
    '(optional: reference, design, display, burned_in, calibration, analysis)',
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
    display,
    burned_in: burnedIn,
    calibration: {
      type: 'array',
      maxItems: 20,
      expected: 'a list of calibration items, each {path, scores, note}, read first and left out of the analysis',
      items: {
        type: 'object',
        additionalProperties: false,
        required: ['path', 'scores'],
        expected: 'a calibration item {path, scores, note}',
        properties: {
          path: text('an image path relative to sources (a file or a DICOM folder), e.g. calibration/blurred.npy'),
          scores: { type: 'object', expected: 'the intended score of each question, e.g. {sharpness: 2}', additionalProperties: { type: 'integer', expected: 'a whole-number score' } },
          note: { type: 'string', expected: 'what the reader should see in this image' },
        },
      },
    },
    analysis: { type: 'object', expected: 'a mapping (analysis settings)' },
  },
};
