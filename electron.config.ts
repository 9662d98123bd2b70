/**
 * Build configuration of Veil's three bundles:
 * - renderer: the Svelte UI, built by Vite into dist/renderer (relative paths, so the same files
 *   load from file:// in Electron and from the localhost host);
 * - main and preload: the Electron main process and its preload script, bundled by esbuild into
 *   dist/electron as CommonJS (a sandboxed preload must be one CommonJS file).
 */
import type { BuildOptions } from 'esbuild';
import type { InlineConfig } from 'vite';
import { svelte } from '@sveltejs/vite-plugin-svelte';
import { join } from 'node:path';
import { ELECTRON_DIST, RENDERER_DIST, REPO_ROOT } from './main/paths.ts';

export const rendererConfig: InlineConfig = {
  configFile: false,
  root: join(REPO_ROOT, 'renderer'),
  base: './',
  plugins: [svelte()],
  logLevel: 'warn',
  build: {
    outDir: RENDERER_DIST,
    emptyOutDir: true,
    target: 'es2022',
    chunkSizeWarningLimit: 1024,
  },
};

const electronCommon: BuildOptions = {
  bundle: true,
  platform: 'node',
  format: 'cjs',
  target: 'node20',
  external: ['electron'],
  sourcemap: true,
  logLevel: 'warning',
};

export const mainConfig: BuildOptions = {
  ...electronCommon,
  entryPoints: [join(REPO_ROOT, 'main', 'electron', 'main.ts')],
  outfile: join(ELECTRON_DIST, 'main.cjs'),
};

export const preloadConfig: BuildOptions = {
  ...electronCommon,
  entryPoints: [join(REPO_ROOT, 'main', 'electron', 'preload.ts')],
  outfile: join(ELECTRON_DIST, 'preload.cjs'),
};
