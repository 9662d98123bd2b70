/**
 * `veil serve`: the API over localhost HTTP on a study folder or a kit, until interrupted.
 */
import { createApi } from '../app/api.ts';
import { RESEARCH_NOTICE } from '../app/notice.ts';
import { startHttpHost, type HttpHost } from './http-host.ts';
import { openBrowser } from './open-browser.ts';
import { RENDERER_DIST } from './paths.ts';

export function portFromEnv(): number | undefined {
  const raw = process.env.VEIL_PORT ?? process.env.PORT;
  if (raw == null || raw === '') return undefined;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new Error(`PORT/VEIL_PORT must be a whole number from 0 to 65535, got '${raw}'`);
  return n;
}

export async function startServing(dir: string, opts: { port?: number; open: boolean }): Promise<HttpHost & { stop(): Promise<void> }> {
  const api = createApi(dir);
  let host: HttpHost;
  try {
    host = await startHttpHost(api, { port: opts.port ?? portFromEnv() ?? 0, staticDir: RENDERER_DIST });
  } catch (e) {
    api.close();
    throw e;
  }
  process.stdout.write(`Veil reading room: ${host.url}\n${RESEARCH_NOTICE}\nPress Ctrl+C to stop.\n`);
  if (opts.open) openBrowser(host.url);
  return {
    ...host,
    async stop() {
      await host.close();
      api.close();
    },
  };
}

/** Serves until SIGINT or SIGTERM, then closes the databases cleanly. */
export async function serveUntilStopped(dir: string, opts: { port?: number; open: boolean }): Promise<void> {
  const s = await startServing(dir, opts);
  await new Promise<void>((done) => {
    const stop = () => { void s.stop().then(done); };
    process.once('SIGINT', stop);
    process.once('SIGTERM', stop);
  });
}
