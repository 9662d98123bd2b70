/**
 * Versioned schema migrations. Each database kind has an ordered list; `PRAGMA user_version`
 * records how many have been applied. A migration runs in one transaction with its version bump,
 * so a crash mid-migration leaves the previous version intact.
 */
import type Database from 'better-sqlite3';

export interface Migration { version: number; description: string; sql: string }

/** Rows of the answer log are never changed or removed: a new score is a new revision. */
const appendOnlyAnswers = (table: string) => `
CREATE TRIGGER ${table}_no_update BEFORE UPDATE ON ${table}
BEGIN SELECT RAISE(ABORT, 'answers are append-only: add a revision instead of changing one'); END;
CREATE TRIGGER ${table}_no_delete BEFORE DELETE ON ${table}
BEGIN SELECT RAISE(ABORT, 'answers are append-only: they cannot be deleted'); END;
`;

/** Every database kind keeps the same audit log (what happened, when, with what detail). */
const AUDIT_TABLE = `CREATE TABLE audit (
  id INTEGER PRIMARY KEY AUTOINCREMENT,
  at TEXT NOT NULL,
  action TEXT NOT NULL,
  detail TEXT NOT NULL
);`;

export const workspaceMigrations: Migration[] = [
  {
    version: 1,
    description: 'study, methods, cases, series, readers, kits, key, answers, audit log',
    sql: `
CREATE TABLE study (
  id INTEGER PRIMARY KEY CHECK (id = 1),
  title TEXT NOT NULL,
  seed INTEGER NOT NULL,
  generator TEXT NOT NULL,
  template_path TEXT NOT NULL,
  template_text TEXT NOT NULL,
  created_at TEXT NOT NULL
);
CREATE TABLE method (
  id TEXT PRIMARY KEY,
  label TEXT NOT NULL,
  path_pattern TEXT NOT NULL,
  position INTEGER NOT NULL
);
CREATE TABLE study_case (
  id TEXT PRIMARY KEY,
  position INTEGER NOT NULL
);
CREATE TABLE question (
  id TEXT PRIMARY KEY,
  text TEXT NOT NULL,
  points INTEGER NOT NULL,
  position INTEGER NOT NULL
);
CREATE TABLE series (
  id INTEGER PRIMARY KEY,
  case_id TEXT NOT NULL REFERENCES study_case(id),
  method_id TEXT REFERENCES method(id),
  role TEXT NOT NULL CHECK (role IN ('method', 'reference')),
  path TEXT NOT NULL,
  format TEXT NOT NULL,
  sha256 TEXT NOT NULL,
  columns INTEGER NOT NULL,
  rows INTEGER NOT NULL,
  slices INTEGER NOT NULL,
  spacing TEXT NOT NULL,
  UNIQUE (case_id, method_id, role)
);
CREATE TABLE reader (
  code TEXT PRIMARY KEY,
  position INTEGER NOT NULL
);
CREATE TABLE kit (
  reader_code TEXT PRIMARY KEY REFERENCES reader(code),
  kit_id TEXT NOT NULL UNIQUE,
  path TEXT NOT NULL,
  created_at TEXT NOT NULL
);
-- The key: opaque item id -> case and method. Coordinator side only; never written to a kit.
CREATE TABLE kit_item (
  item_id TEXT PRIMARY KEY,
  reader_code TEXT NOT NULL REFERENCES reader(code),
  position INTEGER NOT NULL,
  session INTEGER NOT NULL,
  case_id TEXT NOT NULL REFERENCES study_case(id),
  method_id TEXT NOT NULL REFERENCES method(id),
  series_id INTEGER NOT NULL REFERENCES series(id),
  UNIQUE (reader_code, position)
);
CREATE TABLE answer (
  id INTEGER PRIMARY KEY AUTOINCREMENT,
  item_id TEXT NOT NULL REFERENCES kit_item(item_id),
  question_id TEXT NOT NULL REFERENCES question(id),
  score INTEGER NOT NULL,
  revision INTEGER NOT NULL,
  seconds REAL,
  answered_at TEXT NOT NULL,
  source TEXT NOT NULL CHECK (source IN ('collected', 'simulated')),
  UNIQUE (item_id, question_id, revision)
);
${appendOnlyAnswers('answer')}
${AUDIT_TABLE}
`,
  },
];

workspaceMigrations.push({
  version: 2,
  description: 'kit signing and bundle keys, side-by-side pairs, design summary, collected bundles',
  sql: `
CREATE TABLE signing_key (
  id INTEGER PRIMARY KEY CHECK (id = 1),
  private_pem TEXT NOT NULL,
  public_der TEXT NOT NULL,
  created_at TEXT NOT NULL
);
ALTER TABLE kit ADD COLUMN bundle_key TEXT;
ALTER TABLE kit ADD COLUMN public_key TEXT;
ALTER TABLE kit_item ADD COLUMN right_method_id TEXT REFERENCES method(id);
ALTER TABLE kit_item ADD COLUMN right_series_id INTEGER REFERENCES series(id);
ALTER TABLE study ADD COLUMN design TEXT;
-- A collected answer keeps the reader's own revision number; the workspace numbers all revisions itself.
ALTER TABLE answer ADD COLUMN reader_revision INTEGER;
-- Every results bundle taken in, verbatim, so a collect can always be re-examined.
CREATE TABLE bundle (
  id INTEGER PRIMARY KEY AUTOINCREMENT,
  reader_code TEXT NOT NULL REFERENCES reader(code),
  kit_id TEXT NOT NULL,
  sha256 TEXT NOT NULL UNIQUE,
  chains TEXT NOT NULL,
  exported_at TEXT NOT NULL,
  collected_at TEXT NOT NULL,
  file TEXT NOT NULL,
  content TEXT NOT NULL
);
`,
});

workspaceMigrations.push({
  version: 3,
  description: 'image metrics per item against the reference, the blinding-strength check, calibration items',
  sql: `
-- One row per (case, method) with a reference: PSNR, SSIM, NRMSE, HFEN (and masked values) as
-- metricRow() gives them, and the full result with its conventions. Coordinator side only.
CREATE TABLE metric (
  case_id TEXT NOT NULL REFERENCES study_case(id),
  method_id TEXT NOT NULL REFERENCES method(id),
  "values" TEXT NOT NULL,
  detail TEXT NOT NULL,
  PRIMARY KEY (case_id, method_id)
);
ALTER TABLE study ADD COLUMN blinding TEXT;
-- Calibration items: read first by every reader with the intended scores shown; not analysed.
CREATE TABLE calibration_item (
  item_id TEXT PRIMARY KEY,
  reader_code TEXT NOT NULL REFERENCES reader(code),
  position INTEGER NOT NULL,
  path TEXT NOT NULL,
  scores TEXT NOT NULL,
  note TEXT NOT NULL
);
`,
});

workspaceMigrations.push({
  version: 4,
  description: "collected comments and flags, unblinded with the scores",
  sql: `
-- A reader's free-text comments (every revision) and the flags of their submissions, from bundles.
CREATE TABLE item_comment (
  item_id TEXT NOT NULL REFERENCES kit_item(item_id),
  question_id TEXT NOT NULL,
  text TEXT NOT NULL,
  reader_revision INTEGER NOT NULL,
  PRIMARY KEY (item_id, question_id, reader_revision)
);
CREATE TABLE item_submission (
  item_id TEXT NOT NULL REFERENCES kit_item(item_id),
  reader_submission INTEGER NOT NULL,
  flag TEXT,
  flag_note TEXT,
  submitted_at TEXT NOT NULL,
  PRIMARY KEY (item_id, reader_submission)
);
`,
});

export const readerMigrations: Migration[] = [
  {
    version: 1,
    description: 'kit identity, answers, audit log of the reading room',
    sql: `
CREATE TABLE kit_info (
  key TEXT PRIMARY KEY,
  value TEXT NOT NULL
);
CREATE TABLE answer (
  id INTEGER PRIMARY KEY AUTOINCREMENT,
  item_id TEXT NOT NULL,
  question_id TEXT NOT NULL,
  score INTEGER NOT NULL,
  revision INTEGER NOT NULL,
  seconds REAL,
  answered_at TEXT NOT NULL,
  UNIQUE (item_id, question_id, revision)
);
${appendOnlyAnswers('answer')}
${AUDIT_TABLE}
`,
  },
];

readerMigrations.push({
  version: 2,
  description: 'reading room: submissions with active time and flags, comments, completed sessions, display checks',
  sql: `
-- One row per saved item ("save and next"). The answer rows it wrote share its item_id and
-- carry answered_at = submitted_at. A flag travels with the submission; a later one replaces it.
CREATE TABLE submission (
  id INTEGER PRIMARY KEY AUTOINCREMENT,
  item_id TEXT NOT NULL,
  seconds REAL,
  flag TEXT CHECK (flag IN ('does-not-load', 'unrelated-artifact', 'other')),
  flag_note TEXT,
  submitted_at TEXT NOT NULL
);
${appendOnlyAnswers('submission')}
-- Free-text comments on questions that offer one; a changed comment is a new revision.
CREATE TABLE comment (
  id INTEGER PRIMARY KEY AUTOINCREMENT,
  submission_id INTEGER NOT NULL REFERENCES submission(id),
  item_id TEXT NOT NULL,
  question_id TEXT NOT NULL,
  text TEXT NOT NULL,
  revision INTEGER NOT NULL,
  UNIQUE (item_id, question_id, revision)
);
${appendOnlyAnswers('comment')}
-- A session is complete when its last item is saved; the next one opens washout_days later.
CREATE TABLE session_end (
  session INTEGER PRIMARY KEY,
  completed_at TEXT NOT NULL
);
${appendOnlyAnswers('session_end')}
-- The reader's answer to the display check before the first session (common practice).
CREATE TABLE display_check (
  id INTEGER PRIMARY KEY AUTOINCREMENT,
  seen INTEGER NOT NULL CHECK (seen IN (0, 1)),
  checked_at TEXT NOT NULL
);
${appendOnlyAnswers('display_check')}
-- Answers saved before this version: one submission per item and save time.
INSERT INTO submission (item_id, seconds, submitted_at)
  SELECT item_id, MAX(seconds), answered_at FROM answer GROUP BY item_id, answered_at ORDER BY MIN(id);
`,
});

export function migrate(db: Database.Database, migrations: Migration[], file: string): number {
  const current = db.pragma('user_version', { simple: true }) as number;
  const latest = migrations.at(-1)?.version ?? 0;
  if (current > latest) {
    throw new Error(`${file} was written by a newer Veil (schema version ${current}; this one knows up to ${latest}). Update Veil to open it.`);
  }
  for (const m of migrations) {
    if (m.version <= current) continue;
    db.transaction(() => {
      db.exec(m.sql);
      db.pragma(`user_version = ${m.version}`);
    })();
  }
  return latest;
}
