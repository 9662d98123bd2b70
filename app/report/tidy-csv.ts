/**
 * The tidy ratings CSV (design.md, "Contracts > Tidy ratings"): one row per rating,
 * `case,reader,method,question,score` and then any extra columns (`session`, `seconds`, `comment`, ...).
 *
 * Written as RFC 4180: comma separated, CRLF between records, fields quoted when they hold a comma,
 * a double quote or a line break, quotes doubled inside quoted fields. R's read.csv and pandas'
 * read_csv read it as it is.
 *
 * Reading checks the contract and names the file, the line and the column of the first problem:
 * a missing required column, an empty required field, a score that is not a whole number, and the
 * same (case, reader, method, question) rated twice (naming both lines). Extra columns stay strings.
 * Given the questions' scales, it also refuses a score outside its question's scale and a question
 * that has none.
 */
import { parse } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';

export interface TidyRow {
  case: string;
  reader: string;
  method: string;
  question: string;
  score: number;
  [extra: string]: string | number | null;
}

export const TIDY_COLUMNS = ['case', 'reader', 'method', 'question', 'score'] as const;
const KEY_COLUMNS = ['case', 'reader', 'method', 'question'] as const;

const isRequired = (name: string): boolean => (TIDY_COLUMNS as readonly string[]).includes(name);

/** The identity of a rating: one score per (case, reader, method, question). */
export function ratingKey(row: Pick<TidyRow, 'case' | 'reader' | 'method' | 'question'>): string {
  return JSON.stringify([row.case, row.reader, row.method, row.question]);
}

/**
 * What writeTidyCsv accepts: the five required fields, and any other fields as extra columns.
 * (A plain interface such as a database row type fits without declaring an index signature.)
 */
export type TidyRowInput = Pick<TidyRow, 'case' | 'reader' | 'method' | 'question' | 'score'>;

/**
 * Tidy rows to CSV text. `extraColumns` follow the five required columns in the order given;
 * without it, every other key found in the rows is written, in order of first appearance.
 * Extra values must be strings, numbers or null; a null or missing one is written as an empty field.
 */
export function writeTidyCsv<R extends TidyRowInput>(rows: readonly R[], extraColumns?: readonly (keyof R & string)[]): string {
  const extras: readonly string[] =
    extraColumns ?? [...new Set(rows.flatMap((r) => Object.keys(r)).filter((k) => !isRequired(k)))];
  for (const name of extras) {
    if (isRequired(name)) throw new Error(`extra column "${name}" is one of the required columns`);
  }
  if (new Set(extras).size !== extras.length) throw new Error('extra columns must not repeat');
  const columns = [...TIDY_COLUMNS, ...extras];
  const records = rows.map((row, i) => {
    for (const col of KEY_COLUMNS) {
      if (typeof row[col] !== 'string' || row[col] === '') {
        throw new Error(`tidy row ${i + 1}: column "${col}" must be a non-empty string`);
      }
    }
    if (!Number.isInteger(row.score)) {
      throw new Error(`tidy row ${i + 1}: column "score" must be a whole number, got ${String(row.score)}`);
    }
    const fields = row as unknown as Record<string, unknown>;
    return columns.map((c) => {
      const v = fields[c];
      if (v === undefined || v === null) return null;
      if (typeof v === 'string' || (typeof v === 'number' && Number.isFinite(v))) return v;
      throw new Error(`tidy row ${i + 1}: column "${c}" holds ${String(v)}; extra values must be strings, finite numbers or null`);
    });
  });
  return stringify(records, {
    header: true,
    columns,
    record_delimiter: 'windows',
    // RFC 4180 needs any field with a line break quoted; csv-stringify only checks for CRLF itself.
    quoted_match: /[\r\n]/,
  });
}

interface CsvParseError extends Error {
  lines?: number;
}

const LINE_BREAK = /\r\n|\r|\n/g;
const CRLF = /\r\n/g;
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export interface TidyCsvOptions {
  /** Likert scale per question id; scores must lie in 1..points. */
  scales?: Record<string, { points: number }>;
  /** One scale 1..points for every question (when `scales` is not given). */
  points?: number;
}

/**
 * Parse a tidy ratings CSV. `file` is used in error messages only.
 * Blank lines are skipped; a UTF-8 byte order mark is allowed.
 */
export function parseTidyCsv(text: string, file: string, opts: TidyCsvOptions = {}): TidyRow[] {
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(text, { bom: true, skip_empty_lines: true, info: true }) as unknown as typeof records;
  } catch (err) {
    const e = err as CsvParseError;
    const where = e.lines !== undefined ? `${file}:${e.lines}` : file;
    throw new Error(`${where}: not a valid CSV file: ${e.message}`, { cause: err });
  }
  if (records.length === 0) {
    throw new Error(`${file}:1: the file is empty; expected the header ${TIDY_COLUMNS.join(',')}`);
  }

  // A record may span lines (quoted line breaks); csv-parse reports the line it ends on, counting
  // a CRLF inside a quoted field as two lines. Undo that overcount to get the line an editor shows.
  let overcount = 0;
  const startLine = (r: { record: string[]; info: { lines: number } }): number => {
    let breaks = 0;
    for (const f of r.record) {
      overcount += f.match(CRLF)?.length ?? 0;
      breaks += f.match(LINE_BREAK)?.length ?? 0;
    }
    return r.info.lines - overcount - breaks;
  };

  const head = records[0];
  const headerLine = startLine(head);
  const names = head.record.map((h) => h.trim());
  names.forEach((name, i) => {
    if (name === '') {
      throw new Error(
        `${file}:${headerLine}: column ${i + 1} of the header has no name ` +
          '(row names or an index written without a name? write with row.names = FALSE in R, index=False in pandas)',
      );
    }
    if (names.indexOf(name) !== i) {
      throw new Error(`${file}:${headerLine}: column "${name}" appears twice in the header`);
    }
  });
  for (const col of TIDY_COLUMNS) {
    if (!names.includes(col)) {
      throw new Error(
        `${file}:${headerLine}: missing required column "${col}"; the header needs ${TIDY_COLUMNS.join(',')}`,
      );
    }
  }

  const seen = new Map<string, number>();
  const rows: TidyRow[] = [];
  for (const rec of records.slice(1)) {
    const line = startLine(rec);
    const at = (col: string): string => `${file}:${line}: column "${col}"`;
    const cell = (col: string): string => rec.record[names.indexOf(col)];

    const key: Record<(typeof KEY_COLUMNS)[number], string> = { case: '', reader: '', method: '', question: '' };
    for (const col of KEY_COLUMNS) {
      const v = cell(col).trim();
      if (v === '') throw new Error(`${at(col)}: empty; every rating needs a ${col}`);
      key[col] = v;
    }
    const rawScore = cell('score').trim();
    if (rawScore === '') throw new Error(`${at('score')}: empty; every rating needs a score`);
    if (!NUMBER.test(rawScore)) {
      throw new Error(`${at('score')}: "${rawScore}" is not a number; scores are whole numbers on the question's scale`);
    }
    const score = Number(rawScore);
    if (!Number.isInteger(score)) {
      throw new Error(`${at('score')}: ${rawScore} is not a whole number; scores are whole numbers on the question's scale`);
    }

    if (opts.scales || opts.points !== undefined) {
      const scale = opts.scales ? opts.scales[key.question] : { points: opts.points as number };
      if (!scale) {
        throw new Error(
          `${at('question')}: question "${key.question}" has no scale; known questions: ${Object.keys(opts.scales ?? {}).join(', ') || '(none)'}`,
        );
      }
      if (score < 1 || score > scale.points) {
        throw new Error(`${at('score')}: ${score} is outside the scale 1..${scale.points} of question "${key.question}"`);
      }
    }

    const row: TidyRow = { ...key, score };
    names.forEach((name, i) => {
      if (!isRequired(name)) row[name] = rec.record[i];
    });

    const id = ratingKey(row);
    const first = seen.get(id);
    if (first !== undefined) {
      throw new Error(
        `${file}:${line}: duplicate rating: case "${row.case}", reader "${row.reader}", method "${row.method}", ` +
          `question "${row.question}" was already rated on line ${first} (columns ${KEY_COLUMNS.join(', ')})`,
      );
    }
    seen.set(id, line);
    rows.push(row);
  }
  return rows;
}
