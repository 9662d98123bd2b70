/**
 * State of the agreement view: the report the API computes for the served study (the same
 * numbers as `veil agreement --json`), grouped by question for display. The statistics happen
 * behind the API; this store only fetches and arranges.
 */
import type { AgreementGroupJson, AgreementReport } from '../../../app/api-contract.ts';
import { api } from '../api-client.ts';

export interface QuestionBlock {
  question: string;
  /** Per-method groups in report order, then the pooled group ("*") when there is one. */
  groups: AgreementGroupJson[];
}

class AgreementStore {
  report = $state<(AgreementReport & { seedFrom: 'study' | 'request' }) | null>(null);
  loading = $state(false);
  error = $state<string | null>(null);

  get questions(): QuestionBlock[] {
    const byQuestion = new Map<string, AgreementGroupJson[]>();
    for (const g of this.report?.groups ?? []) {
      const list = byQuestion.get(g.question) ?? [];
      list.push(g);
      byQuestion.set(g.question, list);
    }
    return [...byQuestion].map(([question, groups]) => ({ question, groups }));
  }

  async load(): Promise<void> {
    this.loading = true;
    this.error = null;
    try {
      this.report = await api.agreement({});
    } catch (e) {
      this.error = (e as Error).message;
    } finally {
      this.loading = false;
    }
  }
}

export const agreement = new AgreementStore();
