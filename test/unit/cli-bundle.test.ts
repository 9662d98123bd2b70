/**
 * The precompiled command line (bin/cli-bundle.mjs): the bundle answers as the sources run through
 * tsx do, is reused while the sources stay the same, and its fingerprint changes when any source
 * file is added, changed or touched.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
// @ts-expect-error a plain ES module of the launchers, without types
import { sourceFingerprint } from '../../bin/cli-bundle.mjs';
import { tempDir } from './helpers.ts';

const REPO = join(import.meta.dirname, '..', '..');
const VEIL = join(REPO, 'bin', 'veil.mjs');
const veil = (args: string[], env: Record<string, string> = {}) =>
  spawnSync(process.execPath, [VEIL, ...args], { encoding: 'utf8', env: { ...process.env, ...env } });

describe('precompiled command line', () => {
  it('answers as the sources through tsx do, and is reused while they stay the same', () => {
    const bundled = veil(['check', join(REPO, 'no-such.study.yaml')]);
    const direct = veil(['check', join(REPO, 'no-such.study.yaml')], { VEIL_NO_BUNDLE: '1' });
    expect(bundled.status).toBe(1);
    expect(bundled.stderr).toBe(direct.stderr);
    expect(veil(['--help']).stdout).toBe(veil(['--help'], { VEIL_NO_BUNDLE: '1' }).stdout);

    const pointer = JSON.parse(readFileSync(join(REPO, '.veil-cli', 'current.json'), 'utf8')) as { fingerprint: string; entry: string };
    expect(pointer.fingerprint).toBe(sourceFingerprint());
    const built = statSync(join(REPO, '.veil-cli', pointer.entry)).mtimeMs;
    expect(veil(['--version']).stdout.trim()).toMatch(/^\d+\.\d+\.\d+$/);
    expect(statSync(join(REPO, '.veil-cli', pointer.entry)).mtimeMs).toBe(built);
  });

  it('fingerprints every source file: added, changed or touched', () => {
    const root = tempDir('veil-fingerprint-');
    for (const d of ['app', 'main']) mkdirSync(join(root, d));
    writeFileSync(join(root, 'app', 'a.ts'), 'export const a = 1;\n');
    writeFileSync(join(root, 'package.json'), '{}\n');
    const first = sourceFingerprint(root);
    expect(sourceFingerprint(root)).toBe(first);
    writeFileSync(join(root, 'main', 'b.ts'), 'export {};\n');
    const added = sourceFingerprint(root);
    expect(added).not.toBe(first);
    writeFileSync(join(root, 'app', 'a.ts'), 'export const a = 2;\n');
    utimesSync(join(root, 'app', 'a.ts'), new Date(2000, 0, 1), new Date(2000, 0, 1));
    const changed = sourceFingerprint(root);
    expect(changed).not.toBe(added);
    utimesSync(join(root, 'app', 'a.ts'), new Date(2001, 0, 1), new Date(2001, 0, 1));
    expect(sourceFingerprint(root)).not.toBe(changed);
  });
});
