#!/usr/bin/env node
// Builds the renderer (Vite) and the Electron main and preload bundles (esbuild).
// `node bin/build.mjs renderer` or `... electron` builds one part.
import { register } from 'tsx/esm/api';

register();
const { buildParts } = await import('../main/build-parts.ts');
const parts = process.argv.slice(2);
await buildParts(parts.length ? parts : ['renderer', 'electron']);
