/**
 * Builds the demo study once for the whole end-to-end run (the simulated acquisitions take a
 * while on two cores); each test then works on its own copy (see makeDemo in ./host.ts).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export default function globalSetup(): void {
  const dir = mkdtempSync(join(tmpdir(), 'veil-e2e-demo-'));
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [join(import.meta.dirname, '..', '..', 'bin', 'veil.mjs'), 'demo', '--out', dir], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`veil demo failed: ${r.stderr}`);
  process.env.VEIL_E2E_DEMO = dir;
  console.log(`demo study for the end-to-end tests built in ${Math.round(performance.now() - t0)} ms: ${dir}`);
}
