#!/usr/bin/env node
// `npm start`: see main/launcher.ts. Like the volume commands of `veil`, it starts itself once
// more with huge pages (huge-pages.mjs), so that a build started from the coordinator's screen
// allocates its volumes as `veil build` does; the Electron window's API process inherits them.
import { register } from 'tsx/esm/api';
import { runWithHugePages } from './huge-pages.mjs';

await runWithHugePages();
register();
await import('../main/launcher.ts');
