/**
 * The coordinator's API operations. They work on a study folder only: in kit mode (a reader's
 * kit) they refuse, because a kit holds no key and a reader must never reach one.
 */
import { resolve } from 'node:path';
import { ApiError, type CoordinatorApi } from './api-contract.ts';
import { buildStudy } from './blinding/build.ts';
import { collectBundles } from './blinding/collect.ts';
import { hasWorkspace, studyOverview } from './coordinator.ts';
import { JobRegistry } from './jobs.ts';
import { loadTemplate } from './study/parse-template.ts';

export function coordinatorOps(dir: string, mode: 'study' | 'kit', jobs = new JobRegistry()): CoordinatorApi {
  const studyOnly = () => {
    if (mode === 'kit') throw new ApiError('this is a reading kit: it holds no key and no coordinator view', 403);
    if (!hasWorkspace(dir)) throw new ApiError(`${dir} holds no workspace.sqlite: build the study first`, 404);
  };
  return {
    async studyOverview() {
      studyOnly();
      return studyOverview(dir);
    },
    async startBuild({ template, out }) {
      if (mode === 'kit') throw new ApiError('a reading kit cannot build studies', 403);
      if (typeof template !== 'string' || typeof out !== 'string' || !template || !out) throw new ApiError('give the template path and an output folder');
      const t = loadTemplate(resolve(template));
      return jobs.start('build', (signal, progress) => buildStudy(t, resolve(out), progress, signal));
    },
    async job({ id }) {
      return jobs.get(id);
    },
    async cancelJob({ id }) {
      return jobs.cancel(id);
    },
    async collect({ bundles }) {
      studyOnly();
      if (!Array.isArray(bundles) || bundles.some((b) => typeof b?.name !== 'string' || typeof b?.text !== 'string')) {
        throw new ApiError('collect takes a list of bundles, each {name, text}');
      }
      return collectBundles(dir, bundles);
    },
  };
}
