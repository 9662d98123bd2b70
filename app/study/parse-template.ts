/**
 * Reads a study template (`*.study.yaml`) into a StudyTemplate, or throws a TemplateError that
 * lists every problem found, each with the file, the 1-based line and column, the key path
 * (`questions[1].scale.points`) and what would be valid.
 *
 * Steps: YAML with node ranges (syntax errors stop here) -> JSON Schema (./schema.ts, ajv with
 * allErrors, defaults filled) -> rules the schema cannot express -> paths resolved.
 */
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { Ajv } from 'ajv';
import type { ErrorObject, SchemaObject, ValidateFunction } from 'ajv';
import { LineCounter, isAlias, isMap, isScalar, isSeq, parseDocument } from 'yaml';
import type { Document, Node } from 'yaml';
import { EXPECTED_KEYWORD, MAX_POINTS, MIN_POINTS, templateSchema } from './schema.ts';
import { TemplateError } from './template.ts';
import type { BurnedInSpec, DisplaySpec, Question, StudyTemplate, TemplateIssue } from './template.ts';

type Segment = string | number;
type Anchor = 'key' | 'value';

let validator: ValidateFunction | null = null;

function validate(data: unknown): ErrorObject[] {
  if (!validator) {
    const ajv = new Ajv({ allErrors: true, useDefaults: true, verbose: true, strict: true });
    ajv.addKeyword({ keyword: EXPECTED_KEYWORD, schemaType: 'string' });
    validator = ajv.compile(templateSchema);
  }
  return validator(data) ? [] : (validator.errors ?? []);
}

/** Finds where things are in the YAML source and builds issues pointing there. */
class Locator {
  readonly issues: TemplateIssue[] = [];

  constructor(
    private readonly file: string,
    private readonly doc: Document,
    private readonly lines: LineCounter,
  ) {}

  /**
   * The key node and value node at a path. Where the path does not exist (a missing key) they
   * are those of the deepest part that does: the parent's key, or the parent itself. A path
   * through an alias (`*name`) is located at the alias, where the value is used.
   */
  find(path: Segment[]): { key: Node | null; value: Node | null } {
    const at = this.walk(path);
    return at.alias ? { key: null, value: at.alias } : { key: at.key, value: at.value };
  }

  private walk(path: Segment[]): { key: Node | null; value: Node | null; alias: Node | null } {
    let key: Node | null = null;
    let value: unknown = this.doc.contents;
    let alias: Node | null = null;
    for (const seg of path) {
      if (isAlias(value)) {
        alias ??= value;
        value = value.resolve(this.doc);
      }
      if (isMap(value)) {
        const pair = value.items.find((p) => keyText(p.key) === String(seg));
        if (!pair) return { key, value: value as Node, alias };
        key = pair.key as Node;
        value = pair.value;
      } else if (isSeq(value)) {
        const item = value.items[Number(seg)];
        if (item === undefined) return { key, value: value as Node, alias };
        key = null;
        value = item;
      } else {
        return { key, value: (value as Node | null) ?? null, alias };
      }
    }
    if (isAlias(value)) alias ??= value;
    return { key, value: (value as Node | null) ?? null, alias };
  }

  /** 1-based line of a path's value (or key), for "first at line N" remarks. */
  lineOf(path: Segment[]): number | null {
    const at = this.find(path);
    return this.position(at.value ?? at.key)?.line ?? null;
  }

  add(path: Segment[], anchor: Anchor, message: string): void {
    const at = this.find(path);
    const order = anchor === 'value' ? [at.value, at.key] : [at.key, at.value];
    let pos = null;
    for (const node of order) pos ??= this.position(node);
    pos ??= this.position(this.doc.contents as Node | null) ?? { line: 1, col: 1 };
    this.issues.push({ file: this.file, line: pos.line, column: pos.col, key: keyPath(path), message });
  }

  addAt(offset: number, message: string): void {
    const pos = this.lines.linePos(offset);
    this.issues.push({ file: this.file, line: pos.line, column: pos.col, key: '', message });
  }

  private position(node: Node | null | undefined): { line: number; col: number } | null {
    const start = node?.range?.[0];
    return start === undefined ? null : this.lines.linePos(start);
  }
}

function keyText(key: unknown): string {
  return isScalar(key) ? String(key.value) : String(key);
}

/** `questions[1].scale.points`; keys that are not plain words are quoted. */
function keyPath(path: Segment[]): string {
  let out = '';
  for (const seg of path) {
    if (typeof seg === 'number') out += `[${seg}]`;
    else if (/^[A-Za-z0-9_-]+$/.test(seg)) out += out ? `.${seg}` : seg;
    else out += `[${JSON.stringify(seg)}]`;
  }
  return out;
}

/** How a value looks in a message. */
function show(value: unknown): string {
  if (value === null || value === undefined) return 'nothing';
  if (Array.isArray(value)) return `a list of ${value.length} item${value.length === 1 ? '' : 's'}`;
  if (typeof value === 'object') return 'a mapping';
  if (typeof value === 'string') {
    const s = value.length > 60 ? `${value.slice(0, 57)}...` : value;
    return `'${s}'`;
  }
  return String(value);
}

/** JSON pointer -> path segments, with numbers where the data holds a list. */
function pointerToPath(pointer: string, data: unknown): Segment[] {
  if (pointer === '') return [];
  const path: Segment[] = [];
  let here: unknown = data;
  for (const raw of pointer.slice(1).split('/')) {
    const seg = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (Array.isArray(here)) {
      path.push(Number(seg));
      here = here[Number(seg)];
    } else {
      path.push(seg);
      here = here && typeof here === 'object' ? (here as Record<string, unknown>)[seg] : undefined;
    }
  }
  return path;
}

function expectedOf(schema: unknown): string | undefined {
  const s = schema as SchemaObject | undefined;
  return typeof s?.[EXPECTED_KEYWORD] === 'string' ? s[EXPECTED_KEYWORD] : undefined;
}

/**
 * A value that fails several keywords of one subschema (`3` for an enum of strings fails `type`
 * and `enum`) gets one message: the subschema's `expected` says all there is to say.
 */
function onePerSubschema(errors: ErrorObject[]): ErrorObject[] {
  const seen = new Set<string>();
  return errors.filter((e) => {
    if (e.keyword === 'required' || e.keyword === 'additionalProperties') return true;
    const id = `${e.instancePath}|${e.schemaPath.replace(/\/[^/]*$/, '')}`;
    return seen.has(id) ? false : (seen.add(id), true);
  });
}

function translate(e: ErrorObject, data: unknown, where: Locator): void {
  const path = pointerToPath(e.instancePath, data);
  const schema = e.parentSchema as SchemaObject | undefined;
  switch (e.keyword) {
    case 'required': {
      const missing = String(e.params.missingProperty);
      const expected = expectedOf(schema?.properties?.[missing]);
      where.add([...path, missing], 'key', `missing required key '${missing}'${expected ? `; expected ${expected}` : ''}`);
      return;
    }
    case 'additionalProperties': {
      const unknown = String(e.params.additionalProperty);
      const allowed = Object.keys(schema?.properties ?? {}).join(', ');
      where.add([...path, unknown], 'key', `unknown key '${unknown}'; allowed: ${allowed}`);
      return;
    }
    case 'if': // the failing then/else branch reports the detail
    case 'uniqueItems': // checkUnique reports every duplicate with its first occurrence
      return;
    default: {
      const expected = expectedOf(schema);
      const message = expected ? `must be ${expected}, got ${show(e.data)}${quoteHint(e, path, where)}` : (e.message ?? 'is invalid');
      where.add(path, 'value', message);
    }
  }
}

/** YAML reads `001` or `yes`-like words as numbers or booleans: suggest quotes where text was wanted. */
function quoteHint(e: ErrorObject, path: Segment[], where: Locator): string {
  if (e.keyword !== 'type' || e.params.type !== 'string') return '';
  if (typeof e.data !== 'number' && typeof e.data !== 'boolean') return '';
  const node = where.find(path).value;
  const source = isScalar(node) && typeof node.source === 'string' ? node.source : String(e.data);
  return ` (write it in quotes to keep it as text: "${source}")`;
}

// ---- rules the schema cannot express -------------------------------------------------------

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** Every repeat of a value in a list, with the line of its first occurrence. */
function checkUnique(data: Record<string, unknown>, listKey: string, idKey: string | null, noun: string, where: Locator): void {
  const list = data[listKey];
  if (!Array.isArray(list)) return;
  const seen = new Map<string, number>();
  list.forEach((item, index) => {
    const value = idKey === null ? item : isRecord(item) ? item[idKey] : undefined;
    if (typeof value !== 'string') return;
    const first = seen.get(value);
    if (first === undefined) {
      seen.set(value, index);
      return;
    }
    const at = (i: number): Segment[] => (idKey === null ? [listKey, i] : [listKey, i, idKey]);
    const line = where.lineOf(at(first));
    where.add(at(index), 'value', `duplicate ${noun} '${value}' (first at line ${line ?? '?'})`);
  });
}

function checkLabelKeys(data: Record<string, unknown>, where: Locator): void {
  const questions = data.questions;
  if (!Array.isArray(questions)) return;
  questions.forEach((q, index) => {
    if (!isRecord(q) || !isRecord(q.labels)) return;
    const points = isRecord(q.scale) ? q.scale.points : undefined;
    const validPoints =
      typeof points === 'number' && Number.isInteger(points) && points >= MIN_POINTS && points <= MAX_POINTS ? points : null;
    for (const key of Object.keys(q.labels)) {
      const n = /^[0-9]+$/.test(key) ? Number(key) : NaN;
      const ok = Number.isInteger(n) && n >= 1 && (validPoints === null || n <= validPoints);
      if (ok) continue;
      const range = validPoints === null ? 'a whole number of at least 1' : `a whole number from 1 to ${validPoints} (the scale points)`;
      where.add(['questions', index, 'labels', key], 'key', `label key '${key}' must be ${range}`);
    }
  });
}

/** Scale rules by question type: yes-no has none; likert and comparative need one; comparative is odd and side-by-side. */
function checkQuestionTypes(data: Record<string, unknown>, where: Locator): void {
  const questions = data.questions;
  if (!Array.isArray(questions)) return;
  const sideBySide = isRecord(data.design) && data.design.presentation === 'side-by-side';
  questions.forEach((q, index) => {
    if (!isRecord(q)) return;
    const type = q.type ?? 'likert';
    if (type === 'yes-no') {
      // `labels` is {} by the schema's default when not written.
      for (const key of ['scale', 'labels']) {
        if (key === 'scale' ? 'scale' in q : isRecord(q.labels) && Object.keys(q.labels).length > 0) where.add(['questions', index, key], 'key', `a yes-no question has no ${key} (it is scored 1 = no, 2 = yes); remove '${key}'`);
      }
      return;
    }
    if (!('scale' in q)) {
      where.add(['questions', index, 'scale'], 'key', `missing required key 'scale'; expected a Likert scale with the keys points, low and high`);
      return;
    }
    if (type !== 'comparative') return;
    const points = isRecord(q.scale) ? q.scale.points : undefined;
    if (typeof points === 'number' && Number.isInteger(points) && points % 2 === 0) {
      where.add(['questions', index, 'scale', 'points'], 'value',
        `a comparative question needs an odd number of points (symmetric about 'no difference' in the middle), got ${points}`);
    }
    if (!sideBySide) {
      where.add(['questions', index, 'type'], 'value', "a comparative question needs 'design: {presentation: side-by-side}' (it compares two images)");
    }
  });
}

/** Calibration scores name the template's questions and lie on their scales. */
function checkCalibration(data: Record<string, unknown>, where: Locator): void {
  if (!Array.isArray(data.calibration) || !Array.isArray(data.questions)) return;
  const points = new Map<string, number>();
  for (const q of data.questions) {
    if (isRecord(q) && typeof q.id === 'string') points.set(q.id, q.type === 'yes-no' ? 2 : isRecord(q.scale) && typeof q.scale.points === 'number' ? q.scale.points : 0);
  }
  data.calibration.forEach((c, i) => {
    if (!isRecord(c) || !isRecord(c.scores)) return;
    for (const [id, score] of Object.entries(c.scores)) {
      const n = points.get(id);
      if (n === undefined) where.add(['calibration', i, 'scores', id], 'key', `'${id}' is not a question; questions: ${[...points.keys()].join(', ')}`);
      else if (typeof score === 'number' && n > 0 && !(score >= 1 && score <= n)) where.add(['calibration', i, 'scores', id], 'value', `the intended score must be from 1 to ${n}, got ${score}`);
    }
  });
}

/** Display rules the schema cannot express: percentiles in order; match-reference needs a reference. */
function checkDisplay(data: Record<string, unknown>, where: Locator): void {
  const d = data.display;
  if (!isRecord(d)) return;
  const p = d.percentiles;
  if (Array.isArray(p) && p.length === 2 && typeof p[0] === 'number' && typeof p[1] === 'number' && !(p[0] < p[1])) {
    where.add(['display', 'percentiles'], 'value', `the low percentile must be below the high one, got [${p[0]}, ${p[1]}]; e.g. [0, 99.5]`);
  }
  if (Array.isArray(d.presets)) {
    d.presets.forEach((preset, i) => {
      if (isRecord(preset) && typeof preset.low === 'number' && typeof preset.high === 'number' && !(preset.low < preset.high)) {
        where.add(['display', 'presets', i, 'high'], 'value', `a preset's high must be above its low, got low ${preset.low} and high ${preset.high}`);
      }
    });
  }
  if (d.intensity === 'match-reference' && data.reference === undefined) {
    where.add(['display', 'intensity'], 'value',
      "match-reference maps each method onto the reference, but the template has no 'reference'; add one, or use intensity: percentile");
  }
}

const PLACEHOLDER = /\{[^}]*\}/g;

function checkPlaceholders(path: Segment[], pattern: unknown, where: Locator): void {
  if (typeof pattern !== 'string') return;
  for (const m of pattern.match(PLACEHOLDER) ?? []) {
    if (m !== '{case}') where.add(path, 'value', `unknown placeholder '${m}' in '${pattern}'; the only placeholder is {case}`);
  }
}

function checkPaths(data: Record<string, unknown>, where: Locator): void {
  checkPlaceholders(['reference'], data.reference, where);
  if (!Array.isArray(data.methods)) return;
  data.methods.forEach((m, index) => {
    if (!isRecord(m) || typeof m.path !== 'string') return;
    checkPlaceholders(['methods', index, 'path'], m.path, where);
    if (data.cases === 'auto' && !m.path.includes('{case}')) {
      where.add(
        ['methods', index, 'path'],
        'value',
        `must contain {case} when cases is 'auto' (each case folder needs its own file), got '${m.path}'; ` +
          `e.g. "{case}/${m.path}"`,
      );
    }
  });
}

// ---- entry points --------------------------------------------------------------------------

/** Parses and validates template text. `file` is used in issues as given and to resolve paths. */
export function parseTemplate(text: string, file: string): StudyTemplate {
  const lines = new LineCounter();
  // Without a byte order mark, so that columns count as an editor shows them.
  const doc = parseDocument(text.replace(/^\uFEFF/, ''), { lineCounter: lines, prettyErrors: false, uniqueKeys: true });
  const where = new Locator(file, doc, lines);

  if (doc.errors.length > 0) {
    for (const err of doc.errors) where.addAt(err.pos[0], `invalid YAML: ${err.message}`);
    throw new TemplateError(where.issues);
  }

  let data: unknown;
  try {
    data = doc.toJS({ maxAliasCount: 100 });
  } catch (err) {
    where.addAt(0, `invalid YAML: ${(err as Error).message}`);
    throw new TemplateError(where.issues);
  }

  for (const e of onePerSubschema(validate(data))) translate(e, data, where);
  if (isRecord(data)) {
    checkUnique(data, 'methods', 'id', 'method id', where);
    checkUnique(data, 'questions', 'id', 'question id', where);
    checkUnique(data, 'readers', null, 'reader', where);
    checkUnique(data, 'cases', null, 'case', where);
    checkLabelKeys(data, where);
    checkQuestionTypes(data, where);
    checkPaths(data, where);
    checkDisplay(data, where);
    checkCalibration(data, where);
  }
  if (where.issues.length > 0) throw new TemplateError(sortIssues(where.issues));

  return toStudyTemplate(data as RawTemplate, file);
}

/** Reads and parses a template file; a file that cannot be read is a TemplateError naming it. */
export function loadTemplate(path: string): StudyTemplate {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    const why =
      code === 'ENOENT' ? 'file not found; expected a study template (*.study.yaml)'
      : code === 'EISDIR' ? 'is a folder; expected a study template file (*.study.yaml)'
      : `cannot read the file: ${(err as Error).message}`;
    throw new TemplateError([{ file: path, line: null, column: null, key: '', message: why }]);
  }
  return parseTemplate(text, path);
}

function sortIssues(issues: TemplateIssue[]): TemplateIssue[] {
  const seen = new Set<string>();
  return issues
    .filter((i) => {
      const id = `${i.line}:${i.column}:${i.key}:${i.message}`;
      return seen.has(id) ? false : (seen.add(id), true);
    })
    .sort((a, b) => (a.line ?? 0) - (b.line ?? 0) || (a.column ?? 0) - (b.column ?? 0));
}

/** The template as it is after validation and defaults, before paths are resolved. */
interface RawTemplate {
  title: string;
  seed: number;
  sources: string;
  reference?: string;
  methods: StudyTemplate['methods'];
  cases: StudyTemplate['cases'];
  questions: (Omit<Question, 'labels' | 'scale'> & { scale?: Question['scale']; labels?: Record<string, string> })[];
  readers: string[];
  design: StudyTemplate['design'];
  display?: DisplaySpec;
  burned_in?: BurnedInSpec;
  calibration?: { path: string; scores: Record<string, number>; note?: string }[];
}

/** How a yes-no question is scored: 1 = no, 2 = yes. */
export const YES_NO_SCALE = { points: 2, low: 'No', high: 'Yes' } as const;

function toStudyTemplate(raw: RawTemplate, file: string): StudyTemplate {
  const absolute = resolve(file);
  const sources = resolve(dirname(absolute), raw.sources);
  return {
    file: absolute,
    title: raw.title,
    seed: raw.seed,
    sources,
    // Kept as written: like method paths, a pattern relative to `sources` holding {case}
    // (design.md; app/study/cases.ts joins it onto `sources`).
    ...(raw.reference !== undefined ? { reference: raw.reference } : {}),
    methods: raw.methods.map((m) => ({ id: m.id, label: m.label, path: m.path })),
    cases: raw.cases === 'auto' ? 'auto' : [...raw.cases],
    questions: raw.questions.map((q) => ({
      id: q.id,
      text: q.text,
      scale: q.type === 'yes-no' ? { ...YES_NO_SCALE } : { points: q.scale!.points, low: q.scale!.low, high: q.scale!.high },
      labels: Object.fromEntries(Object.entries(q.labels ?? {}).map(([k, v]) => [Number(k), v])),
      ...(q.type !== undefined ? { type: q.type } : {}),
      ...(q.required !== undefined ? { required: q.required } : {}),
      ...(q.comment !== undefined ? { comment: q.comment } : {}),
    })),
    readers: [...raw.readers],
    design: {
      presentation: raw.design.presentation,
      sessions: raw.design.sessions,
      washout_days: raw.design.washout_days,
      ...(raw.design.revisits !== undefined ? { revisits: raw.design.revisits } : {}),
    },
    calibration: (raw.calibration ?? []).map((c) => ({ path: resolve(sources, c.path), scores: { ...c.scores }, note: c.note ?? '' })),
    ...(raw.burned_in ? { burned_in: { apply: raw.burned_in.apply, regions: (raw.burned_in.regions ?? []).map(({ x, y, width, height }) => ({ x, y, width, height })) } } : {}),
    ...(raw.display
      ? { display: {
        matching: raw.display.matching, intensity: raw.display.intensity, percentiles: [raw.display.percentiles[0], raw.display.percentiles[1]],
        presets: (raw.display.presets ?? []).map(({ name, low, high }) => ({ name, low, high })),
      } }
      : {}),
  };
}
