/**
 * The coordinator's override of a washout lock. Reading happens offline, so the override travels
 * as a small file signed with the workspace's Ed25519 key: `overrides/session-<n>.json` in the
 * reader's kit folder. The reading room opens the session early only for a file that names its
 * kit and verifies against the public key in the kit's integrity list; the workspace audit log
 * records every override issued.
 */
import { createPrivateKey, createPublicKey, sign, verify } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { canonicalJson } from './canonical-json.ts';
import type { KitIntegrity, SigningKey } from './kit-integrity.ts';

export const OVERRIDES_DIR = 'overrides';

export interface WashoutOverride {
  format: 'veil-washout-override';
  kitId: string;
  reader: string;
  session: number;
  reason: string;
  issuedAt: string;
  /** Ed25519 signature (base64) of the canonical JSON of the fields above. */
  signature: string;
}

export function writeWashoutOverride(kitDir: string, o: Omit<WashoutOverride, 'format' | 'signature' | 'issuedAt'>, key: Pick<SigningKey, 'privatePem'>, now = new Date()): string {
  const body = { format: 'veil-washout-override' as const, ...o, issuedAt: now.toISOString() };
  const signature = sign(null, Buffer.from(canonicalJson(body)), createPrivateKey(key.privatePem)).toString('base64');
  mkdirSync(join(kitDir, OVERRIDES_DIR), { recursive: true });
  const file = join(kitDir, OVERRIDES_DIR, `session-${o.session}.json`);
  writeFileSync(file, JSON.stringify({ ...body, signature }, null, 1));
  return file;
}

/** Sessions whose washout the coordinator lifted for this kit; unsigned, foreign or edited files do not count. */
export function readWashoutOverrides(kitDir: string, integrity: KitIntegrity): Set<number> {
  const dir = join(kitDir, OVERRIDES_DIR);
  const sessions = new Set<number>();
  if (!existsSync(dir)) return sessions;
  const pub = createPublicKey({ key: Buffer.from(integrity.publicKey, 'base64'), format: 'der', type: 'spki' });
  for (const name of readdirSync(dir)) {
    try {
      const { signature, ...body } = JSON.parse(readFileSync(join(dir, name), 'utf8')) as WashoutOverride;
      if (body.format !== 'veil-washout-override' || body.kitId !== integrity.kitId || !Number.isInteger(body.session)) continue;
      if (verify(null, Buffer.from(canonicalJson(body)), pub, Buffer.from(signature, 'base64'))) sessions.add(body.session);
    } catch {
      // An unreadable file is no override.
    }
  }
  return sessions;
}
