import { describe, expect, it } from 'vitest';
import { parseTidyCsv, writeTidyCsv } from '../../app/report/tidy-csv.ts';
import type { TidyRow } from '../../app/report/tidy-csv.ts';

const rows: TidyRow[] = [
  { case: 'c01', reader: 'R1', method: 'm-zerofill', question: 'sharpness', score: 2, session: '1', comment: 'blurry, "ringing"' },
  { case: 'c01', reader: 'R2', method: 'm-zerofill', question: 'sharpness', score: 3, session: '2', comment: 'line one\nline two' },
  { case: 'c02', reader: 'R1', method: 'm-iterative', question: 'sharpness', score: 5, session: '1', comment: null },
];

describe('writeTidyCsv', () => {
  it('writes the required columns first, then the extras, as RFC 4180 with CRLF', () => {
    const text = writeTidyCsv(rows, ['session', 'comment']);
    expect(text).toBe(
      'case,reader,method,question,score,session,comment\r\n' +
        'c01,R1,m-zerofill,sharpness,2,1,"blurry, ""ringing"""\r\n' +
        'c01,R2,m-zerofill,sharpness,3,2,"line one\nline two"\r\n' +
        'c02,R1,m-iterative,sharpness,5,1,\r\n',
    );
  });

  it('writes only the five columns when asked for no extras, and finds the extras when not told', () => {
    expect(writeTidyCsv(rows, []).split('\r\n')[0]).toBe('case,reader,method,question,score');
    expect(writeTidyCsv(rows).split('\r\n')[0]).toBe('case,reader,method,question,score,session,comment');
  });

  it('refuses rows that break the contract', () => {
    expect(() => writeTidyCsv([{ ...rows[0], score: 2.5 }])).toThrow(/row 1: column "score" must be a whole number/);
    expect(() => writeTidyCsv([{ ...rows[0], reader: '' }])).toThrow(/row 1: column "reader"/);
    expect(() => writeTidyCsv(rows, ['score'])).toThrow(/required/);
  });

  it('takes rows of a plain interface, numbers and nulls in extra columns', () => {
    interface StoredRating {
      case: string;
      reader: string;
      method: string;
      question: string;
      score: number;
      session: number;
      seconds: number | null;
    }
    const stored: StoredRating[] = [{ case: 'c1', reader: 'R1', method: 'm', question: 'q', score: 4, session: 2, seconds: null }];
    expect(writeTidyCsv(stored, ['session', 'seconds'])).toBe('case,reader,method,question,score,session,seconds\r\nc1,R1,m,q,4,2,\r\n');
    const odd = [{ ...rows[0], flag: true }];
    expect(() => writeTidyCsv(odd, ['flag'])).toThrow(/column "flag" holds true/);
  });

  it('round-trips through parseTidyCsv, keeping extras as strings', () => {
    const back = parseTidyCsv(writeTidyCsv(rows, ['session', 'comment']), 'round.csv');
    expect(back).toEqual(rows.map((r) => ({ ...r, comment: r.comment ?? '' })));
    expect(typeof back[0].session).toBe('string');
  });
});

describe('parseTidyCsv', () => {
  it('reads columns in any order, a BOM, LF line ends and blank lines', () => {
    const text = '\uFEFFscore,question,case,reader,method,seconds\n4,noise,c1,R1,m-a,12.5\n\n3,noise,c2,R1,m-a,8\n';
    expect(parseTidyCsv(text, 'x.csv')).toEqual([
      { case: 'c1', reader: 'R1', method: 'm-a', question: 'noise', score: 4, seconds: '12.5' },
      { case: 'c2', reader: 'R1', method: 'm-a', question: 'noise', score: 3, seconds: '8' },
    ]);
  });

  it('names the file, line and column of a missing required column', () => {
    expect(() => parseTidyCsv('case,reader,method,score\nc1,R1,m,3\n', 'ratings.csv')).toThrow(
      /^ratings\.csv:1: missing required column "question"/,
    );
  });

  it('names the file, line and column of an empty required field', () => {
    const text = 'case,reader,method,question,score\nc1,R1,m,q,3\nc2,,m,q,4\n';
    expect(() => parseTidyCsv(text, 'ratings.csv')).toThrow(/^ratings\.csv:3: column "reader": empty/);
    expect(() => parseTidyCsv('case,reader,method,question,score\nc1,R1,m,q, \n', 'r.csv')).toThrow(
      /^r\.csv:2: column "score": empty/,
    );
  });

  it('names the line and column of a non-numeric or non-integer score', () => {
    const head = 'case,reader,method,question,score\n';
    expect(() => parseTidyCsv(head + 'c1,R1,m,q,good\n', 'a.csv')).toThrow(/^a\.csv:2: column "score": "good" is not a number/);
    expect(() => parseTidyCsv(head + 'c1,R1,m,q,0x3\n', 'a.csv')).toThrow(/is not a number/);
    expect(() => parseTidyCsv(head + 'c1,R1,m,q,3\nc2,R1,m,q,3.5\n', 'a.csv')).toThrow(
      /^a\.csv:3: column "score": 3\.5 is not a whole number/,
    );
    expect(parseTidyCsv(head + 'c1,R1,m,q,3.0\n', 'a.csv')[0].score).toBe(3);
  });

  it('names both lines of a duplicate rating', () => {
    const text = 'case,reader,method,question,score\nc1,R1,m,q,3\nc1,R2,m,q,3\nc1,R1,m,q,4\n';
    expect(() => parseTidyCsv(text, 'dup.csv')).toThrow(/^dup\.csv:4: duplicate rating: .*already rated on line 2/);
  });

  it('counts lines correctly after a quoted line break', () => {
    const text = 'case,reader,method,question,score,comment\nc1,R1,m,q,3,"two\r\nlines"\nc2,R1,m,q,x,\n';
    expect(() => parseTidyCsv(text, 'q.csv')).toThrow(/^q\.csv:4: column "score"/);
    // CRLF file with a quoted CRLF, LF and CR (each one line break, as editors count them):
    // line 1 header, 2-3 c1, 4-5 c2, 6-7 c3, 8 c1 again.
    const crlf =
      'case,reader,method,question,score,comment\r\n' +
      'c1,R1,m,q,3,"a\r\nb"\r\n' +
      'c2,R1,m,q,3,"a\nb"\r\n' +
      'c3,R1,m,q,3,"a\rb"\r\n' +
      'c1,R1,m,q,4,\r\n';
    expect(() => parseTidyCsv(crlf, 'w.csv')).toThrow(/^w\.csv:8: duplicate rating: .*already rated on line 2/);
  });

  it('reports malformed CSV, unnamed and repeated header columns with the file name', () => {
    expect(() => parseTidyCsv('case,reader,method,question,score\nc1,R1,m,q\n', 'bad.csv')).toThrow(
      /^bad\.csv:2: not a valid CSV file/,
    );
    expect(() => parseTidyCsv(',case,reader,method,question,score\n1,c1,R1,m,q,3\n', 'pandas.csv')).toThrow(
      /^pandas\.csv:1: column 1 of the header has no name/,
    );
    expect(() => parseTidyCsv('case,reader,method,question,score,case\n', 'twice.csv')).toThrow(/"case" appears twice/);
    expect(() => parseTidyCsv('', 'empty.csv')).toThrow(/^empty\.csv:1: the file is empty/);
  });
});

describe('parseTidyCsv with the questions\' scales', () => {
  const csv = 'case,reader,method,question,score\nc1,R1,m,sharpness,5\nc1,R1,m,noise,3\nc2,R1,m,noise,6\n';

  it('names the line of a score outside its question\'s scale', () => {
    expect(() => parseTidyCsv(csv, 'r.csv', { scales: { sharpness: { points: 5 }, noise: { points: 5 } } })).toThrow(
      'r.csv:4: column "score": 6 is outside the scale 1..5 of question "noise"',
    );
    expect(() => parseTidyCsv(csv, 'r.csv', { points: 4 })).toThrow('r.csv:2: column "score": 5 is outside the scale 1..4 of question "sharpness"');
    expect(parseTidyCsv(csv, 'r.csv', { points: 6 })).toHaveLength(3);
  });

  it('names the line of a question the scales do not know', () => {
    expect(() => parseTidyCsv(csv, 'r.csv', { scales: { sharpness: { points: 5 } } })).toThrow(
      'r.csv:3: column "question": question "noise" has no scale; known questions: sharpness',
    );
  });
});
