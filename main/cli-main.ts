/** Entry of the `veil` command: the core command line with the localhost host plugged in. */
import { runCli } from '../app/cli.ts';
import { serveUntilStopped } from './serve.ts';

const code = await runCli(process.argv.slice(2), { serve: serveUntilStopped });
process.exitCode = code;
