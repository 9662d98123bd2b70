/**
 * Long work behind the API (building kits, for now) runs as a job: the call that starts it returns
 * at once with a job id; the UI polls `job` for progress and may cancel. Jobs live in memory
 * for the life of the host; their results are in the study folder anyway.
 */
import { randomBytes } from 'node:crypto';
import { ApiError, type JobView } from './api-contract.ts';

interface Job extends JobView { controller: AbortController }

export interface JobProgress { done: number; total: number; what: string }

export class JobRegistry {
  private readonly jobs = new Map<string, Job>();

  start(kind: string, run: (signal: AbortSignal, progress: (p: JobProgress) => void) => Promise<unknown>): JobView {
    const id = `job-${randomBytes(6).toString('hex')}`;
    const job: Job = { id, kind, state: 'running', progress: { done: 0, total: 0, what: 'starting' }, controller: new AbortController() };
    this.jobs.set(id, job);
    run(job.controller.signal, (p) => { job.progress = p; })
      .then((result) => { job.state = 'done'; job.result = result; })
      .catch((e: unknown) => {
        if (job.controller.signal.aborted) { job.state = 'cancelled'; job.error = 'cancelled; nothing was written'; }
        else { job.state = 'failed'; job.error = (e as Error).message; }
      });
    return this.view(job);
  }

  get(id: string): JobView {
    const job = this.jobs.get(id);
    if (!job) throw new ApiError(`no job '${id}'`, 404);
    return this.view(job);
  }

  cancel(id: string): JobView {
    const job = this.jobs.get(id);
    if (!job) throw new ApiError(`no job '${id}'`, 404);
    if (job.state === 'running') job.controller.abort();
    return this.view(job);
  }

  /** Resolves when every running job has ended (for a clean shutdown and for tests). */
  async settle(): Promise<void> {
    while ([...this.jobs.values()].some((j) => j.state === 'running')) await new Promise((r) => setTimeout(r, 20));
  }

  private view({ controller: _c, ...rest }: Job): JobView {
    return { ...rest, progress: { ...rest.progress } };
  }
}
