#!/usr/bin/env node
// The `veil` command. It runs a precompiled bundle of the TypeScript sources, rebuilt whenever they
// change (cli-bundle.mjs), or, if that cannot be made, the sources themselves through tsx's loader.
// The commands that read whole studies' volumes start themselves once more with huge pages (see
// huge-pages.mjs; about 0.1 s to start, against 0.5 s or more saved per 256 MB volume). The
// others, `serve` among them, stay one process.
import { runWithHugePages } from './huge-pages.mjs';
import { bundledCli } from './cli-bundle.mjs';

const VOLUME_COMMANDS = ['check', 'build', 'metrics', 'demo'];
await runWithHugePages(VOLUME_COMMANDS.includes(process.argv[2]));
const bundle = await bundledCli();
if (bundle) await import(bundle);
else {
  const { register } = await import('tsx/esm/api');
  register();
  await import('../main/cli-main.ts');
}
