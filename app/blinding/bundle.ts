/**
 * Results bundles: what a reader sends back. A bundle holds every row of the reader's answer
 * database (every answer with all its revisions, timestamps and active seconds, and the audit
 * log), the kit id and reader code, a hash chain per table, and an HMAC-SHA256 over all of it
 * keyed with the kit's own secret. An edited, truncated or foreign bundle fails the check.
 *
 * Hash chain of a table: h_0 = 64 zeros; h_i = SHA-256(h_{i-1} || canonical JSON of row i), rows in
 * id order. Tables are append-only, so a later export of the same kit extends every chain: its
 * first n rows give the same h_n as the earlier export's head.
 */
import type Database from 'better-sqlite3';
import { createHash, createHmac, timingSafeEqual } from 'node:crypto';
import { canonicalJson } from './canonical-json.ts';

export const BUNDLE_FORMAT = 'veil-results';
export const BUNDLE_VERSION = 1;
export const BUNDLE_SUFFIX = '.veil-results.json';

export type Row = Record<string, string | number | null>;

export interface Chain { rows: number; head: string }

export interface ResultsBundle {
  format: typeof BUNDLE_FORMAT;
  version: typeof BUNDLE_VERSION;
  kitId: string;
  reader: string;
  exportedAt: string;
  tables: Record<string, Row[]>;
  chains: Record<string, Chain>;
  /** HMAC-SHA256 (hex) with the kit's bundle key over the canonical JSON of every field above. */
  mac: string;
}

const ZERO = '0'.repeat(64);

export function chainOf(rows: Row[], upTo = rows.length): Chain {
  let h = ZERO;
  for (let i = 0; i < upTo; i++) h = createHash('sha256').update(h).update(canonicalJson(rows[i])).digest('hex');
  return { rows: upTo, head: h };
}

function macOf(body: Omit<ResultsBundle, 'mac'>, key: string): string {
  return createHmac('sha256', Buffer.from(key, 'base64')).update(canonicalJson(body)).digest('hex');
}

/** Every user table of the reader database, rows in id (or rowid) order. */
function readTables(db: Database.Database): Record<string, Row[]> {
  const names = (db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name").all() as { name: string }[])
    .map((t) => t.name);
  return Object.fromEntries(names.map((n) => [n, db.prepare(`SELECT * FROM "${n}" ORDER BY rowid`).all() as Row[]]));
}

export function makeBundle(db: Database.Database, kitId: string, reader: string, bundleKey: string, now = new Date()): ResultsBundle {
  const tables = readTables(db);
  const chains = Object.fromEntries(Object.entries(tables).map(([n, rows]) => [n, chainOf(rows)]));
  const body = { format: BUNDLE_FORMAT, version: BUNDLE_VERSION, kitId, reader, exportedAt: now.toISOString(), tables, chains } as const;
  return { ...body, mac: macOf(body, bundleKey) };
}

export class BundleError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BundleError';
  }
}

/** Parses a bundle file's text, checking its shape (not yet its MAC: that needs the kit's key). */
export function parseBundle(text: string, file: string): ResultsBundle {
  let b: Partial<ResultsBundle>;
  try {
    b = JSON.parse(text) as Partial<ResultsBundle>;
  } catch (e) {
    throw new BundleError(`${file}: not a results bundle (not JSON: ${(e as Error).message}); it may be truncated`);
  }
  if (b.format !== BUNDLE_FORMAT) throw new BundleError(`${file}: not a Veil results bundle`);
  if (b.version !== BUNDLE_VERSION) throw new BundleError(`${file}: bundle version ${b.version} is not supported (this Veil reads ${BUNDLE_VERSION})`);
  if (typeof b.kitId !== 'string' || typeof b.reader !== 'string' || typeof b.mac !== 'string' || !b.tables || !b.chains) {
    throw new BundleError(`${file}: the bundle is incomplete (needs kitId, reader, tables, chains and mac)`);
  }
  return b as ResultsBundle;
}

/** Checks the MAC with the kit's key and every chain against its rows. */
export function verifyBundle(b: ResultsBundle, bundleKey: string, file: string): void {
  const { mac, ...body } = b;
  const want = Buffer.from(macOf(body, bundleKey), 'hex');
  const got = Buffer.from(mac, 'hex');
  if (want.length !== got.length || !timingSafeEqual(want, got)) {
    throw new BundleError(`${file}: the bundle does not match its kit's key: it was edited, truncated, or made for another kit`);
  }
  for (const [name, rows] of Object.entries(b.tables)) {
    const c = chainOf(rows);
    const stated = b.chains[name];
    if (!stated || stated.rows !== c.rows || stated.head !== c.head) throw new BundleError(`${file}: the hash chain of '${name}' is broken`);
  }
}

/** True when `later` holds every row of `earlier` unchanged, in the same order (it may add rows). */
export function extendsBundle(later: ResultsBundle, earlier: ResultsBundle): boolean {
  for (const [name, chain] of Object.entries(earlier.chains)) {
    const rows = later.tables[name];
    if (!rows || rows.length < chain.rows) return false;
    if (chainOf(rows, chain.rows).head !== chain.head) return false;
  }
  return true;
}
