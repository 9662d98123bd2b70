/**
 * Every random choice of a study follows from its seed. Each purpose (a reader's order, the
 * opaque item ids, ...) draws from its own MT19937 stream, seeded by `init_by_array` with
 * [seed mod 2^32, floor(seed / 2^32), the first four 32-bit words (big endian) of
 * SHA-256("<purpose>:<name>")], so adding a reader never changes another reader's schedule.
 */
import { createHash } from 'node:crypto';
import { MT19937 } from './mt19937.ts';

export const GENERATOR_NAME = 'MT19937 (init_by_array) with Fisher-Yates shuffling';

export function streamFor(seed: number, purpose: string, name = ''): MT19937 {
  const digest = createHash('sha256').update(`${purpose}:${name}`, 'utf8').digest();
  const key = [seed % 2 ** 32, Math.floor(seed / 2 ** 32)];
  for (let i = 0; i < 4; i++) key.push(digest.readUInt32BE(i * 4));
  return MT19937.fromArray(key);
}

const ID_ALPHABET = '0123456789abcdefghjkmnpqrstvwxyz'; // Crockford base32, lower case: no i, l, o, u

/** Opaque ids drawn from the generator: they say nothing about case, method or order. */
export function drawOpaqueIds(seed: number, purpose: string, count: number, length = 10): string[] {
  const rng = streamFor(seed, purpose);
  const seen = new Set<string>();
  const ids: string[] = [];
  while (ids.length < count) {
    let id = '';
    for (let i = 0; i < length; i++) id += ID_ALPHABET[rng.nextBelow(32)];
    if (seen.has(id)) continue;
    seen.add(id);
    ids.push(id);
  }
  return ids;
}
