/**
 * Kit integrity. At build, `integrity.json` lists every file of the kit with its size and SHA-256
 * and is signed with the workspace's Ed25519 key (node:crypto). The reading room refuses a kit
 * whose listed files are missing, resized or changed, or whose list does not match its signature,
 * naming the file. The signing key stays in the workspace; the kit carries only the public key,
 * which the coordinator's copy in the workspace confirms at collect time.
 *
 * Threat model (README): this catches corrupted, mixed-up and casually edited kits. It does not
 * stop a reader who rebuilds a kit on purpose with a key of their own.
 */
import { createHash, createPrivateKey, createPublicKey, generateKeyPairSync, sign, verify } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative, resolve, sep } from 'node:path';
import { canonicalJson } from './canonical-json.ts';
import { ANSWERS_FILE } from './kit-format.ts';

export const INTEGRITY_FILE = 'integrity.json';
const exactly = (name: string): string => name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
/**
 * Files that live in a kit folder but change while reading, so they are not listed: the reader's
 * answer database with SQLite's files beside it (its WAL, shared memory and rollback journal; a kill
 * in the moment before a new database is switched to WAL leaves the journal) and Veil's write lock,
 * exported results, washout overrides and this list itself.
 */
const UNLISTED = [
  new RegExp(`^${exactly(ANSWERS_FILE)}(-wal|-shm|-journal|\\.lock)?$`), /^results(\/|$)/, /^overrides(\/|$)/, new RegExp(`^${exactly(INTEGRITY_FILE)}$`),
];

export interface KitFileEntry { path: string; bytes: number; sha256: string }

export interface KitIntegrity {
  format: 'veil-kit-integrity';
  version: 1;
  kitId: string;
  files: KitFileEntry[];
  /** Secret of this kit, used to authenticate its results bundles (see ./bundle.ts). */
  bundleKey: string;
  /** Ed25519 public key (SPKI, DER, base64) that made `signature`. */
  publicKey: string;
  /** Ed25519 signature (base64) of the canonical JSON of every field above. */
  signature: string;
}

export interface SigningKey { privatePem: string; publicDer: string }

export function newSigningKey(): SigningKey {
  const { privateKey, publicKey } = generateKeyPairSync('ed25519');
  return {
    privatePem: privateKey.export({ format: 'pem', type: 'pkcs8' }).toString(),
    publicDer: publicKey.export({ format: 'der', type: 'spki' }).toString('base64'),
  };
}

export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** The kit's files that integrity.json lists (slash-separated paths, sorted). */
export function listFiles(dir: string, root = dir): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    const rel = relative(root, p).split(sep).join('/');
    if (UNLISTED.some((re) => re.test(rel))) continue;
    if (e.isDirectory()) out.push(...listFiles(p, root));
    else out.push(rel);
  }
  return out.sort();
}

function signedPart(i: Omit<KitIntegrity, 'signature'>): string {
  return canonicalJson(i);
}

/**
 * `known` holds hashes the caller computed while writing (the same image bytes go into several
 * kits, so hashing them once saves reading every kit back); other files are read and hashed here.
 */
export function writeKitIntegrity(kitDir: string, kitId: string, bundleKey: string, key: SigningKey, known?: Map<string, KitFileEntry>): KitIntegrity {
  const files = listFiles(kitDir).map((path) => {
    const k = known?.get(path);
    if (k && statSync(join(kitDir, path)).size === k.bytes) return k;
    const bytes = readFileSync(join(kitDir, path));
    return { path, bytes: bytes.length, sha256: sha256Hex(bytes) };
  });
  const body = { format: 'veil-kit-integrity' as const, version: 1 as const, kitId, files, bundleKey, publicKey: key.publicDer };
  const signature = sign(null, Buffer.from(signedPart(body)), createPrivateKey(key.privatePem)).toString('base64');
  const integrity: KitIntegrity = { ...body, signature };
  writeFileSync(join(kitDir, INTEGRITY_FILE), JSON.stringify(integrity, null, 1));
  return integrity;
}

export class KitIntegrityError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'KitIntegrityError';
  }
}

/**
 * Checks the signature, that every listed file exists with its size, and that no unlisted file
 * has been added. Contents are hashed when read (`checkFileBytes`), so opening a kit stays fast.
 */
export function verifyKitIntegrity(kitDir: string, opts: { hashAll?: boolean } = {}): KitIntegrity {
  const file = join(kitDir, INTEGRITY_FILE);
  if (!existsSync(file)) throw new KitIntegrityError(`${file} is missing: this kit cannot be checked; ask the coordinator for a fresh copy`);
  let integrity: KitIntegrity;
  try {
    integrity = JSON.parse(readFileSync(file, 'utf8')) as KitIntegrity;
  } catch (e) {
    throw new KitIntegrityError(`${file}: unreadable (${(e as Error).message})`);
  }
  const { signature, ...body } = integrity;
  let ok = false;
  try {
    const pub = createPublicKey({ key: Buffer.from(body.publicKey, 'base64'), format: 'der', type: 'spki' });
    ok = verify(null, Buffer.from(signedPart(body)), pub, Buffer.from(signature, 'base64'));
  } catch {
    ok = false;
  }
  if (!ok) throw new KitIntegrityError(`${file}: the signature does not match the file list; the kit was changed after it was built`);
  const root = resolve(kitDir);
  for (const f of integrity.files) {
    const p = resolve(root, f.path);
    if (!p.startsWith(root + sep)) throw new KitIntegrityError(`${file}: listed path ${f.path} leaves the kit folder`);
    if (!existsSync(p)) throw new KitIntegrityError(`${join(kitDir, f.path)} is missing from the kit`);
    if (statSync(p).size !== f.bytes) throw new KitIntegrityError(`${join(kitDir, f.path)} has been changed (size ${statSync(p).size}, expected ${f.bytes})`);
    if (opts.hashAll) checkFileBytes(integrity, kitDir, f.path, readFileSync(p));
  }
  const listed = new Set(integrity.files.map((f) => f.path));
  const extra = listFiles(kitDir).filter((p) => !listed.has(p));
  if (extra.length) throw new KitIntegrityError(`${join(kitDir, extra[0])} does not belong to the kit (${extra.length} unexpected file(s))`);
  return integrity;
}

export function checkFileBytes(integrity: KitIntegrity, kitDir: string, path: string, bytes: Uint8Array): void {
  const entry = integrity.files.find((f) => f.path === path);
  if (!entry) throw new KitIntegrityError(`${join(kitDir, path)} is not listed in the kit's ${INTEGRITY_FILE}`);
  if (sha256Hex(bytes) !== entry.sha256) throw new KitIntegrityError(`${join(kitDir, path)} has been changed (its SHA-256 differs from the kit's list)`);
}
