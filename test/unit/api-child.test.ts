/**
 * The relay the Electron host uses: main/api-child.ts runs the API in a Node child and answers
 * requests over the child-process channel, pixels included (structured clone of ArrayBuffers).
 */
import { fork } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import type { ChildResponse } from '../../main/api-child.ts';
import { writeTinyStudy } from './helpers.ts';

describe('API child process (Electron relay)', () => {
  it('answers operations, returns pixels as an ArrayBuffer and passes errors back', async () => {
    const { dir, template } = writeTinyStudy();
    const out = join(dir, 'study');
    await buildStudy(loadTemplate(template), out);
    const child = fork(join(import.meta.dirname, '..', '..', 'main', 'api-child.ts'), [out], {
      execArgv: ['--import', 'tsx'], serialization: 'advanced', stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
    });
    const replies = new Map<number, ChildResponse>();
    const waiters = new Map<number, (r: ChildResponse) => void>();
    child.on('message', (m: ChildResponse) => { replies.set(m.id, m); waiters.get(m.id)?.(m); });
    const reply = (id: number) => replies.get(id) ?? new Promise<ChildResponse>((ok) => waiters.set(id, ok));
    try {
      expect((await reply(0)).value).toBe('ready');
      child.send({ id: 1, op: 'openKit', arg: { reader: 'R1' } });
      const kit = (await reply(1)).value as { items: { id: string }[] };
      child.send({ id: 2, op: 'itemPixels', arg: { reader: 'R1', itemId: kit.items[0].id } });
      const px = (await reply(2)).value;
      expect(px).toBeInstanceOf(ArrayBuffer);
      expect((px as ArrayBuffer).byteLength).toBe(2 * 8 * 8 * 2);
      child.send({ id: 3, op: 'submitAnswer', arg: { reader: 'R1', itemId: kit.items[0].id, scores: {}, seconds: 1 } });
      const err = await reply(3);
      expect(err.ok).toBe(false);
      expect(err.error).toMatch(/has no score/);
      child.send({ id: 4, op: 'deleteEverything', arg: {} });
      expect((await reply(4)).status).toBe(404);
    } finally {
      const exited = new Promise((ok) => child.once('exit', ok));
      child.disconnect();
      await exited;
    }
  });
});
