/**
 * Which cases a study has and where each method's source of each case lives.
 * `cases: auto` takes every folder under `sources` that holds all method paths; folders that
 * hold only some are reported, so that a missing reconstruction is never silently skipped.
 */
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import type { StudyTemplate } from './template.ts';

export interface CaseSources {
  caseId: string;
  methods: Record<string, string>;
  reference: string | null;
}

export interface CaseResolution {
  cases: CaseSources[];
  /** Human-readable problems; a build must not proceed when there are any. */
  problems: string[];
  /** Folders skipped by `cases: auto` because they hold no method path at all. */
  ignored: string[];
}

export function sourcePath(template: StudyTemplate, pattern: string, caseId: string): string {
  return join(template.sources, pattern.replaceAll('{case}', caseId));
}

/** The case folders to look at: the listed ones, or every visible folder under sources ('auto'); null when sources is no folder. */
export function caseCandidates(template: StudyTemplate): string[] | null {
  if (!existsSync(template.sources) || !statSync(template.sources).isDirectory()) return null;
  if (template.cases !== 'auto') return template.cases;
  return readdirSync(template.sources, { withFileTypes: true })
    .filter((d) => d.isDirectory() && !d.name.startsWith('.'))
    .map((d) => d.name)
    .sort((a, b) => a.localeCompare(b, 'en', { numeric: true }));
}

export function resolveCases(template: StudyTemplate): CaseResolution {
  const problems: string[] = [];
  const ignored: string[] = [];
  const candidates = caseCandidates(template);
  if (!candidates) {
    return { cases: [], problems: [`${template.file}: sources: folder ${template.sources} does not exist`], ignored };
  }
  const cases: CaseSources[] = [];
  for (const caseId of candidates) {
    const methods: Record<string, string> = {};
    const missing: string[] = [];
    for (const m of template.methods) {
      const p = sourcePath(template, m.path, caseId);
      if (existsSync(p)) methods[m.id] = p;
      else missing.push(`${m.id} (${p})`);
    }
    let reference: string | null = null;
    if (template.reference) {
      const p = sourcePath(template, template.reference, caseId);
      if (existsSync(p)) reference = p;
      else missing.push(`reference (${p})`);
    }
    if (template.cases === 'auto' && Object.keys(methods).length === 0) {
      ignored.push(caseId);
      continue;
    }
    if (missing.length) {
      problems.push(`case ${caseId}: missing ${missing.join(', ')}`);
      continue;
    }
    cases.push({ caseId, methods, reference });
  }
  if (cases.length === 0 && problems.length === 0) {
    problems.push(`${template.file}: no case found under ${template.sources} holding every method path`);
  }
  return { cases, problems, ignored };
}
