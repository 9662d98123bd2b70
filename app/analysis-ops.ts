/**
 * The analysis operations. Like the coordinator's, they work on a study folder only: in kit mode
 * they refuse, because a kit holds no key and the analysis is unblinded.
 */
import { isAbsolute, resolve } from 'node:path';
import { ApiError, type AnalysisApi } from './api-contract.ts';
import type { AnalysisFilter } from './report/analysis-types.ts';
import { hasWorkspace } from './coordinator.ts';

function cleanFilter(f: unknown): AnalysisFilter {
  const x = (f ?? {}) as Record<string, unknown>;
  const out: AnalysisFilter = {};
  for (const k of ['question', 'method', 'reader'] as const) {
    const v = x[k];
    if (v === undefined || v === null || v === '') continue;
    if (typeof v !== 'string') throw new ApiError(`filter ${k} must be an id`);
    out[k] = v;
  }
  return out;
}

export function analysisOps(dir: string, mode: 'study' | 'kit'): AnalysisApi {
  const studyOnly = (): void => {
    if (mode === 'kit') throw new ApiError('this is a reading kit: it holds no key and no analysis', 403);
    if (!hasWorkspace(dir)) throw new ApiError(`${dir} holds no workspace.sqlite: build the study first`, 404);
  };
  const build = async (filter: AnalysisFilter) => {
    const { loadStudyInputs, AnalysisSettingsError } = await import('./report/study-inputs.ts');
    const { buildAnalysis } = await import('./report/build-report.ts');
    let inputs;
    try { inputs = loadStudyInputs(dir); } catch (e) { throw e instanceof AnalysisSettingsError ? new ApiError(e.message) : e; }
    if (inputs.ratings.length === 0) throw new ApiError('no answers yet: collect results bundles first', 409);
    for (const [k, list] of [['question', inputs.design.questions.map((q) => q.id)], ['method', inputs.design.methods.map((m) => m.id)], ['reader', inputs.design.readers]] as const) {
      const v = filter[k];
      if (v !== undefined && !list.includes(v)) throw new ApiError(`no ${k} "${v}" in this study; ${k}s: ${list.join(', ')}`);
    }
    return { inputs, analysis: await buildAnalysis(inputs, { filter }) };
  };
  return {
    async analysis(req) {
      studyOnly();
      return (await build(cleanFilter(req))).analysis;
    },
    async exportReport({ out, filter }) {
      studyOnly();
      if (typeof out !== 'string' || out === '') throw new ApiError('give the folder to write the report into');
      const { writeReport } = await import('./report/write-report.ts');
      const { inputs, analysis } = await build(cleanFilter(filter));
      const target = isAbsolute(out) ? out : resolve(dir, out);
      const f = analysis.filter;
      const rows = inputs.ratings.filter((r) => (!f.question || r.question === f.question) && (!f.method || r.method === f.method) && (!f.reader || r.reader === f.reader));
      return writeReport(target, analysis, rows, ['session', 'seconds', 'source', 'flag', 'comment']);
    },
  };
}
