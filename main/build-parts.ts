/** Runs the builds that electron.config.ts describes. */
import { build as viteBuild } from 'vite';
import { build as esbuild } from 'esbuild';
import { mainConfig, preloadConfig, rendererConfig } from '../electron.config.ts';

export async function buildParts(parts: string[]): Promise<void> {
  for (const part of parts) {
    const t0 = performance.now();
    if (part === 'renderer') await viteBuild(rendererConfig);
    else if (part === 'electron') await Promise.all([esbuild(mainConfig), esbuild(preloadConfig)]);
    else throw new Error(`unknown part '${part}'; parts: renderer, electron`);
    process.stderr.write(`built ${part} in ${Math.round(performance.now() - t0)} ms\n`);
  }
}
