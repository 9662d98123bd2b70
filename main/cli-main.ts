/** Entry of the `veil` command: the core command line with the localhost host plugged in. */
import { runCli } from '../app/cli.ts';

// The host is imported only when `veil serve` runs; other commands start without it.
const serve: Parameters<typeof runCli>[1]['serve'] = async (dir, opts) => (await import('./serve.ts')).serveUntilStopped(dir, opts);
const code = await runCli(process.argv.slice(2), { serve });
process.exitCode = code;
