/**
 * `npm run bench [-- NAME...]`: runs every benchmark module in this folder (each exports
 * `bench(): Promise<string[]>`), one after the other so they do not compete for the two cores,
 * and prints their lines. Reference tools (cp, pydicom, scikit-image, R) are measured in the same
 * run by the modules themselves; a module whose reference tool is missing says so and goes on.
 * Like the `veil` commands that read volumes, the run starts itself again with glibc's huge-page
 * tunable (bin/huge-pages.mjs), so that what is measured in process is what those commands do.
 */
import { readdirSync } from 'node:fs';
// @ts-expect-error a plain ES module of the launchers, without types
import { runWithHugePages } from '../../bin/huge-pages.mjs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

await runWithHugePages();

const HERE = import.meta.dirname;
const wanted = process.argv.slice(2);
const modules = readdirSync(HERE)
  .filter((f) => f.endsWith('.ts') && !['run.ts', 'stats.ts'].includes(f))
  .map((f) => f.slice(0, -3))
  .filter((name) => wanted.length === 0 || wanted.includes(name))
  .sort();

let failed = 0;
for (const name of modules) {
  console.log(`\n## ${name}`);
  try {
    const mod = (await import(pathToFileURL(join(HERE, `${name}.ts`)).href)) as { bench?: () => Promise<string[]> };
    if (!mod.bench) { console.log('(no bench() exported)'); continue; }
    for (const line of await mod.bench()) console.log(line);
  } catch (e) {
    failed++;
    console.log(`FAILED: ${(e as Error).message}`);
  }
}
process.exitCode = failed ? 1 : 0;
