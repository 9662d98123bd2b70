/**
 * State of the analysis screen: the filter, the analysis the API returns for it (tables, figure
 * SVGs, methods text), and the last export. The statistics happen behind the API.
 */
import type { AnalysisFilter, AnalysisResult } from '../../../app/api-contract.ts';
import { api } from '../api-client.ts';

class ReportStore {
  filter = $state<AnalysisFilter>({});
  result = $state<AnalysisResult | null>(null);
  loading = $state(false);
  error = $state<string | null>(null);
  exported = $state<string | null>(null);
  exportError = $state<string | null>(null);
  exporting = $state(false);

  async load(): Promise<void> {
    this.loading = true;
    this.error = null;
    try {
      this.result = await api.analysis({ ...this.filter });
    } catch (e) {
      this.error = (e as Error).message;
    } finally {
      this.loading = false;
    }
  }

  async setFilter(key: keyof AnalysisFilter, value: string): Promise<void> {
    this.filter = { ...this.filter, [key]: value || undefined };
    await this.load();
  }

  async exportTo(out: string): Promise<void> {
    this.exporting = true;
    this.exportError = null;
    try {
      this.exported = (await api.exportReport({ out, filter: { ...this.filter } })).dir;
    } catch (e) {
      this.exportError = (e as Error).message;
    } finally {
      this.exporting = false;
    }
  }
}

export const report = new ReportStore();
