/**
 * State of the coordinator screens: the study overview, the running build job (polled), and the
 * results of the last collect. The work itself happens behind the API.
 */
import type { CheckView, CollectResultView, JobView, StudyOverview } from '../../../app/api-contract.ts';
import { api } from '../api-client.ts';

class CoordinatorStore {
  overview = $state<StudyOverview | null>(null);
  overviewError = $state<string | null>(null);
  job = $state<JobView | null>(null);
  check = $state<CheckView | null>(null);
  checking = $state(false);
  buildError = $state<string | null>(null);
  collected = $state<CollectResultView[]>([]);
  collecting = $state(false);
  collectError = $state<string | null>(null);
  private polling: ReturnType<typeof setInterval> | null = null;

  async refresh(): Promise<void> {
    try {
      this.overview = await api.studyOverview();
      this.overviewError = null;
    } catch (e) {
      this.overviewError = (e as Error).message;
    }
  }

  /** Runs `veil check` on the template; the build is offered once it passes. */
  async runCheck(template: string): Promise<void> {
    this.buildError = null;
    this.check = null;
    this.checking = true;
    try {
      this.check = await api.checkTemplate({ template });
    } catch (e) {
      this.buildError = (e as Error).message;
    } finally {
      this.checking = false;
    }
  }

  async startBuild(template: string, out: string, zip = false): Promise<void> {
    this.buildError = null;
    try {
      this.job = await api.startBuild({ template, out, zip });
      this.poll();
    } catch (e) {
      this.buildError = (e as Error).message;
    }
  }

  private poll(): void {
    if (this.polling) clearInterval(this.polling);
    this.polling = setInterval(async () => {
      if (!this.job) return;
      try {
        this.job = await api.job({ id: this.job.id });
      } catch (e) {
        this.buildError = (e as Error).message;
      }
      if (this.job?.state !== 'running' && this.polling) {
        clearInterval(this.polling);
        this.polling = null;
      }
    }, 150);
  }

  async cancelBuild(): Promise<void> {
    if (this.job) this.job = await api.cancelJob({ id: this.job.id });
  }

  async collect(files: File[]): Promise<void> {
    if (files.length === 0) return;
    this.collecting = true;
    this.collectError = null;
    try {
      const bundles = await Promise.all(files.map(async (f) => ({ name: f.name, text: await f.text() })));
      this.collected = await api.collect({ bundles });
      await this.refresh();
    } catch (e) {
      this.collectError = (e as Error).message;
    } finally {
      this.collecting = false;
    }
  }
}

export const coordinator = new CoordinatorStore();
