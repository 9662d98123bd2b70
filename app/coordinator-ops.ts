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
import { TemplateError, type StudyTemplate } from './study/template.ts';
import { checkStudy } from './study/check.ts';

/** The template at a path on the host; its errors (file, line, key) are the user's to fix. */
function templateAt(path: string): StudyTemplate {
  try {
    return loadTemplate(resolve(path));
  } catch (e) {
    if (e instanceof TemplateError) throw new ApiError(e.message);
    throw e;
  }
}

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
    async checkTemplate({ template }) {
      if (mode === 'kit') throw new ApiError('a reading kit cannot check studies', 403);
      if (typeof template !== 'string' || !template) throw new ApiError('give the path of the study template');
      const r = await checkStudy(templateAt(template));
      return { ok: r.ok, title: r.title, sources: r.sources, problems: r.problems, warnings: r.warnings, blinding: r.blinding };
    },
    async startBuild({ template, out, zip }) {
      if (mode === 'kit') throw new ApiError('a reading kit cannot build studies', 403);
      if (typeof template !== 'string' || typeof out !== 'string' || !template || !out) throw new ApiError('give the template path and an output folder');
      const t = templateAt(template);
      return jobs.start('build', (signal, progress) => buildStudy(t, resolve(out), progress, signal, { zip: zip === true }));
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
