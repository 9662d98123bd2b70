/**
 * Worker threads that make cases' images for `veil build` (./case-images.ts), so that reading,
 * converting and measuring run on every core while the build's own thread writes kits and the
 * workspace. Each worker makes one case at a time and waits for each image to be taken before it
 * goes on, so the build's bounded writing holds the workers back instead of letting images pile
 * up. An error in a worker comes back as the same kind of error (BuildError, SourceError) with
 * the same message.
 */
import type { Worker } from 'node:worker_threads';
import { startWorker } from '../worker-thread.ts';
import { SourceError } from '../images/source-error.ts';
import { BuildError } from './build-error.ts';
import type { CaseDone, CaseImage, CaseJob } from './case-images.ts';

type FromWorker =
  | { type: 'image'; id: number; seq: number; image: CaseImage }
  | { type: 'done'; id: number; done: CaseDone }
  | { type: 'error'; id: number; error: { name: string; message: string; problems?: string[] } };

interface Running {
  onImage: (image: CaseImage) => Promise<void>;
  ok: (done: CaseDone) => void;
  fail: (e: Error) => void;
}

function rebuilt(error: { name: string; message: string; problems?: string[] }): Error {
  if (error.name === 'BuildError') return new BuildError(error.problems ?? [error.message]);
  if (error.name === 'SourceError') {
    const at = error.message.indexOf(': ');
    return new SourceError(error.message.slice(0, at), error.message.slice(at + 2));
  }
  const e = new Error(error.message);
  e.name = error.name;
  return e;
}

class CaseWorker {
  private readonly worker = startWorker(new URL('./build-worker.cjs', import.meta.url));
  private running: Running | null = null;
  private nextId = 1;
  private id = 0;

  constructor() {
    this.worker.on('message', (m: FromWorker) => {
      const r = this.running;
      if (!r || m.id !== this.id) return;
      if (m.type === 'image') {
        r.onImage(m.image).then(
          () => this.worker.postMessage({ type: 'taken', seq: m.seq }),
          (e: Error) => this.finish((x) => x.fail(e)),
        );
      } else if (m.type === 'done') this.finish((x) => x.ok(m.done));
      else this.finish((x) => x.fail(rebuilt(m.error)));
    });
    this.worker.on('error', (e) => this.finish((x) => x.fail(e)));
    this.worker.on('exit', (code) => this.finish((x) => x.fail(new Error(`a build worker stopped (exit ${code})`))));
  }

  get busy(): boolean {
    return this.running !== null;
  }

  private finish(how: (r: Running) => void): void {
    const r = this.running;
    this.running = null;
    if (r) how(r);
  }

  run(job: CaseJob, onImage: (image: CaseImage) => Promise<void>): Promise<CaseDone> {
    return new Promise((ok, fail) => {
      this.id = this.nextId++;
      this.running = { onImage, ok, fail };
      this.worker.postMessage({ type: 'case', id: this.id, job });
    });
  }

  terminate(): Promise<number> {
    return this.worker.terminate();
  }
}

export class CaseWorkers {
  private readonly workers: CaseWorker[];

  /** Starts `count` workers now (at least one). */
  constructor(count: number) {
    this.workers = Array.from({ length: Math.max(1, count) }, () => new CaseWorker());
  }

  get size(): number {
    return this.workers.length;
  }

  /** Makes a case on an idle worker; the caller keeps at most `size` cases running. */
  run(job: CaseJob, onImage: (image: CaseImage) => Promise<void>): Promise<CaseDone> {
    const idle = this.workers.find((w) => !w.busy);
    if (!idle) return Promise.reject(new Error('every build worker is busy'));
    return idle.run(job, onImage);
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}
