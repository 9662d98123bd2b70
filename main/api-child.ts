/**
 * The API in a plain Node process, for the Electron host. Electron's main process forwards each
 * IPC call here over the child-process channel; running the core under the system's Node keeps
 * native modules (better-sqlite3) on the ABI they were built for, and keeps file and database
 * work out of the UI process.
 */
import { createApi } from '../app/api.ts';
import { ApiError, OPERATIONS, type OperationName } from '../app/api-contract.ts';

export interface ChildRequest { id: number; op: OperationName; arg: unknown }
export interface ChildResponse { id: number; ok: boolean; value?: unknown; error?: string; status?: number }

const dir = process.argv[2];
if (!dir || !process.send) {
  process.stderr.write('api-child: needs a study or kit folder and an IPC channel\n');
  process.exit(2);
}
const api = createApi(dir);

process.on('message', async (msg: ChildRequest) => {
  let reply: ChildResponse;
  try {
    if (!OPERATIONS.includes(msg.op)) throw new ApiError(`no operation '${msg.op}'`, 404);
    const value = await (api[msg.op] as (a: unknown) => Promise<unknown>)(msg.arg);
    reply = { id: msg.id, ok: true, value };
  } catch (e) {
    reply = { id: msg.id, ok: false, error: (e as Error).message, status: e instanceof ApiError ? e.status : 500 };
  }
  process.send!(reply);
});

process.on('disconnect', () => {
  api.close();
  process.exit(0);
});
process.send!({ id: 0, ok: true, value: 'ready' } satisfies ChildResponse);
