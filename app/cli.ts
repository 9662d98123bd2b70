/**
 * The `veil` command. Human-readable output by default, `--json` for machines.
 * Exit codes: 0 success, 1 failed check or bad input (the message names what and where), 2 usage.
 * Hosts (main/) inject `serve`, so this file stays free of transports.
 */
import { Command, CommanderError, InvalidArgumentError, Option } from 'commander';
import { join } from 'node:path';
// Each command imports what it needs when it runs: `veil metrics` should not pay for the
// statistics, nor `veil agreement` for the image readers.
import { TemplateError } from './study/template.ts';
import { BuildError } from './blinding/build-error.ts';
import type { BuildProgress, BuildSummary } from './blinding/build.ts';
import { DEFAULT_BOOTSTRAP_RESAMPLES, DEFAULT_BOOTSTRAP_SEED } from './stats/bootstrap.ts';
import { RESEARCH_NOTICE, VEIL_VERSION } from './notice.ts';

export interface CliHooks {
  /** Starts the localhost host on a study or kit folder; resolves when it stops. */
  serve(dir: string, opts: { port?: number; open: boolean }): Promise<void>;
}

export interface CliIO {
  out(text: string): void;
  err(text: string): void;
  isTTY: boolean;
}

const defaultIO: CliIO = {
  out: (t) => process.stdout.write(t),
  err: (t) => process.stderr.write(t),
  isTTY: !!process.stderr.isTTY,
};

/** An error whose message is for the user; exits 1 without a stack trace. */
class InputError extends Error {}

function progressPrinter(io: CliIO): ((p: BuildProgress) => void) | undefined {
  if (!io.isTTY) return undefined;
  return (p) => {
    io.err(`\r\x1b[2K[${p.done}/${p.total}] ${p.what}`);
    if (p.done === p.total) io.err('\n');
  };
}

async function describeBuild(s: BuildSummary): Promise<string> {
  const { formatBlindingStrength } = await import('./metrics/blinding-strength.ts');
  const lines = [
    `Built "${s.title}": ${s.cases} cases x ${s.methods} methods, ${s.readers} readers, ${s.itemsPerReader} items per reader in ${s.sessions} session(s).`,
    `Seed ${s.seed}, generator ${s.generator}.`,
    `Design (${s.design.presentation}): methods per session ${Object.entries(s.design.methodsBySession).map(([m, n]) => `${m} ${n.join('/')}`).join(', ')}; ` +
      `mean place in session ${Object.entries(s.design.meanPosition).map(([m, p]) => `${m} ${p.toFixed(2)}`).join(', ')}` +
      (s.design.leftCount ? `; on the left ${Object.entries(s.design.leftCount).map(([m, n]) => `${m} ${n}`).join(', ')}` : '') +
      (Number.isFinite(s.design.minSameCaseGap) ? `; items of one case at least ${s.design.minSameCaseGap} apart` : '; each case at most once a session') + '.',
    `Workspace (coordinator only, holds the key): ${s.workspace}`,
    ...s.kits.map((k) => `Kit for ${k.reader}: ${k.path} (${k.items} items; per session ${k.perSession.join(' / ')})${k.zip ? `; for transfer: ${k.zip}` : ''}${k.zipSkipped ? `; not zipped: ${k.zipSkipped}` : ''}`),
    s.metrics ? `Image metrics against the reference for ${s.metrics} items (stored in the workspace only).` : 'No image metrics (no reference).',
    ...s.metricNotes,
    s.blinding ? formatBlindingStrength(s.blinding) : 'Blinding-strength check: needs at least two cases and two methods.',
  ];
  return lines.join('\n') + '\n';
}

export function buildProgram(hooks: CliHooks, io: CliIO = defaultIO): Command {
  const program = new Command('veil')
    .description(`Blinded reader studies of reconstructed medical images.\n${RESEARCH_NOTICE}`)
    .version(VEIL_VERSION)
    .showHelpAfterError('(run `veil --help` for usage)')
    .configureOutput({ writeOut: io.out, writeErr: io.err });

  program.command('check').argument('<template>', 'study template (*.study.yaml)')
    .description('validate the template and every source: a case x method table, every problem at once, blinding warnings; exit 0 only when a build would work')
    .option('--json', 'machine-readable output (problems and warnings included)')
    .action(async (file: string, o: { json?: boolean }) => {
      const { loadTemplate } = await import('./study/parse-template.ts');
      const { formatTemplateIssue } = await import('./study/template.ts');
      const { checkStudy, formatCheckReport } = await import('./study/check.ts');
      let t;
      try {
        t = loadTemplate(file);
      } catch (e) {
        if (!(o.json && e instanceof TemplateError)) throw e;
        const problems = e.issues.map((i) => ({ case: null, source: null, file: i.file, line: i.line, key: i.key, message: formatTemplateIssue(i) }));
        io.out(JSON.stringify({ ok: false, template: file, problems, warnings: [] }, null, 2) + '\n');
        process.exitCode = 1;
        return;
      }
      const report = await checkStudy(t, progressPrinter(io));
      io.out(o.json ? JSON.stringify(report, null, 2) + '\n'
        : formatCheckReport(report, { methods: t.methods.length, questions: t.questions.length, readers: t.readers.length }));
      if (!report.ok) process.exitCode = 1;
    });

  program.command('build').argument('<template>', 'study template (*.study.yaml)')
    .description('import sources, write DIR/workspace.sqlite and one reading kit per reader under DIR/kits/')
    .requiredOption('--out <dir>', 'study folder to create')
    .option('--zip', 'also write each kit as kits/<reader>.zip for transfer')
    .option('--json', 'machine-readable output')
    .action(async (file: string, o: { out: string; zip?: boolean; json?: boolean }) => {
      const { loadTemplate } = await import('./study/parse-template.ts');
      const { buildStudy } = await import('./blinding/build.ts');
      const summary = await buildStudy(loadTemplate(file), o.out, progressPrinter(io), undefined, { zip: o.zip });
      io.out(o.json ? JSON.stringify(summary, null, 2) + '\n' : await describeBuild(summary));
    });

  program.command('collect').argument('<dir>', 'study folder').argument('<results...>', 'results bundles (*.veil-results.json)')
    .description('verify results bundles and unblind their answers into the workspace (one transaction)')
    .option('--json', 'machine-readable output')
    .action(async (dir: string, files: string[], o: { json?: boolean }) => {
      const { collectBundles } = await import('./blinding/collect.ts');
      const results = collectBundles(dir, files);
      if (o.json) io.out(JSON.stringify({ results }, null, 2) + '\n');
      else {
        for (const r of results) {
          io.out(`${r.status.padEnd(9)} ${r.file}${r.reader ? ` (${r.reader})` : ''}${r.added ? `: ${r.added} answers added` : ''}${r.reason ? `: ${r.reason}` : ''}\n`);
        }
      }
      if (results.some((r) => r.status === 'refused' || r.status === 'conflict')) process.exitCode = 1;
    });

  program.command('unlock').argument('<dir>', 'study folder')
    .description("lift a reader's washout lock before a session early (signed override, written to the audit log)")
    .requiredOption('--reader <code>', 'reader code')
    .requiredOption('--session <n>', 'the session to open', (v) => wholeNumber(v, 1))
    .requiredOption('--reason <text>', 'why (kept in the audit log)')
    .action(async (dir: string, o: { reader: string; session: number; reason: string }) => {
      const { unlockSession, UnlockError } = await import('./blinding/unlock.ts');
      try {
        const file = unlockSession(dir, o.reader, o.session, o.reason);
        io.out(`Session ${o.session} of ${o.reader} opens now. Override written to ${file}; if the reader works on another machine, send them this file for the kit's overrides/ folder.\n`);
      } catch (e) {
        if (e instanceof UnlockError) throw new InputError(e.message);
        throw e;
      }
    });

  program.command('report').argument('<dir>', 'study folder')
    .description('statistics, figures and tables: REPORT/ratings.csv, tables/*.csv, tables.md, tables.tex, figures/*.svg|png, report.html')
    .requiredOption('--out <report>', 'report folder to write')
    .addOption(new Option('--bootstrap <n>', 'bootstrap resamples (comparisons and agreement)').argParser((v) => wholeNumber(v, 0)).default(2000))
    .action(async (dir: string, o: { out: string; bootstrap: number }) => {
      const { loadStudyInputs, AnalysisSettingsError } = await import('./report/study-inputs.ts');
      const { buildAnalysis } = await import('./report/build-report.ts');
      const { writeReport } = await import('./report/write-report.ts');
      const { workspacePath } = await import('./store/workspace.ts');
      let inputs;
      try { inputs = loadStudyInputs(dir); } catch (e) { throw e instanceof AnalysisSettingsError ? new InputError(e.message) : e; }
      if (inputs.ratings.length === 0) {
        // Nothing to analyse yet: still write the (empty) tidy ratings, as before.
        const { writeTidyCsv } = await import('./report/tidy-csv.ts');
        const { mkdirSync, writeFileSync } = await import('node:fs');
        mkdirSync(o.out, { recursive: true });
        writeFileSync(join(o.out, 'ratings.csv'), writeTidyCsv(inputs.ratings, ['session', 'seconds', 'source', 'flag', 'comment']));
        io.out(`Wrote 0 ratings to ${join(o.out, 'ratings.csv')}; no answers yet in ${workspacePath(dir)}, so no analysis (collect results bundles first).\n`);
        return;
      }
      const analysis = await buildAnalysis(inputs, { resamples: o.bootstrap });
      const written = writeReport(o.out, analysis, inputs.ratings, ['session', 'seconds', 'source', 'flag', 'comment']);
      const simulated = analysis.simulated;
      io.out(`Wrote ${inputs.ratings.length} ratings to ${join(written.dir, 'ratings.csv')}${simulated ? ` (${simulated} from simulated readers)` : ''}.\n` +
        `Wrote ${analysis.tables.length} tables, ${analysis.figures.length} figures and the HTML report: ${join(written.dir, 'report.html')}\n`);
    });

  program.command('agreement').argument('<ratings>', 'tidy ratings CSV (case,reader,method,question,score)')
    .description('inter-reader agreement per method and question, and pooled over methods: ICC, kappas, alpha, W, AC1/AC2')
    .option('--question <id>', 'only this question')
    .option('--method <id>', 'only this method (then no pooled groups)')
    .addOption(new Option('--bootstrap <n>', "resamples for the intervals of Fleiss' kappa and Krippendorff's alpha; 0 for none")
      .argParser((v) => wholeNumber(v, 0)).default(DEFAULT_BOOTSTRAP_RESAMPLES))
    .addOption(new Option('--seed <s>', 'seed of the bootstrap').argParser((v) => wholeNumber(v, 0)).default(DEFAULT_BOOTSTRAP_SEED))
    .option('--template <file>', "study template: its questions' scales set the categories and every score is checked against them")
    .addOption(new Option('--points <n>', 'every question is scored 1..N (for a CSV without its template)')
      .argParser((v) => wholeNumber(v, 2)).conflicts('template'))
    .option('--json', 'machine-readable output')
    .action(async (file: string, o: { question?: string; method?: string; bootstrap: number; seed: number; template?: string; points?: number; json?: boolean }) => {
      const { readFileSync } = await import('node:fs');
      const { loadTemplate } = await import('./study/parse-template.ts');
      const { parseTidyCsv } = await import('./report/tidy-csv.ts');
      const { agreementReport } = await import('./stats/agreement.ts');
      const { formatAgreementTable } = await import('./stats/agreement-table.ts');
      let text: string;
      try { text = readFileSync(file, 'utf8'); } catch (e) { throw new InputError(`${file}: cannot read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`); }
      const questions = o.template ? loadTemplate(o.template).questions : null;
      const scales = questions ? Object.fromEntries(questions.map((q) => [q.id, { points: q.scale.points }])) : undefined;
      let rows;
      try { rows = parseTidyCsv(text, file, { scales, points: o.points }); } catch (e) { throw new InputError((e as Error).message); }
      const perQuestion = o.points !== undefined ? Object.fromEntries(rows.map((r) => [r.question, { points: o.points! }])) : scales;
      const report = agreementReport(rows, { question: o.question, method: o.method, scales: perQuestion, bootstrap: o.bootstrap, seed: o.seed });
      if (report.groups.length === 0) throw new InputError(`${file}: no ratings${o.method || o.question ? ' match the filter' : ''}`);
      io.out(o.json ? JSON.stringify(report, null, 2) + '\n' : formatAgreementTable(report));
    });

  program.command('metrics')
    .description('image metrics (PSNR, SSIM, NRMSE, HFEN) of a test volume against a reference, with the conventions used')
    .requiredOption('--reference <a>', 'reference volume (any supported source)')
    .requiredOption('--test <b>', 'test volume, same shape as the reference')
    .option('--mask <m>', "foreground mask: a volume file (nonzero = foreground) or 'auto' (Otsu + largest component of the reference, holes filled)")
    .addOption(new Option('--data-range <x>', 'data range L for PSNR and SSIM (default: max - min of the reference)').argParser((v) => {
      const n = Number(v);
      if (!(Number.isFinite(n) && n > 0)) throw new InvalidArgumentError('the data range must be a positive number');
      return n;
    }))
    .option('--json', 'machine-readable output')
    .action(async (o: { reference: string; test: string; mask?: string; dataRange?: number; json?: boolean }) => {
      const { compareVolumesInParallel, metricsJson, formatVolumeMetrics } = await import('./metrics/compare-volumes.ts');
      const { MetricWorkers } = await import('./metrics/metric-workers.ts');
      const { MetricsError } = await import('./metrics/metrics-error.ts');
      const { loadVolume } = await import('./images/load.ts');
      const workers = new MetricWorkers(); // they start while the volumes are read
      try {
        const [reference, test] = [await loadVolume(o.reference), await loadVolume(o.test)];
        const mask = o.mask === undefined ? null : o.mask === 'auto' ? 'auto' as const : await loadVolume(o.mask);
        const r = await compareVolumesInParallel(reference, test, { mask, dataRange: o.dataRange }, workers);
        io.out(o.json ? JSON.stringify({ ...metricsJson(r), reference: reference.provenance.path, test: test.provenance.path }, null, 2) + '\n'
          : formatVolumeMetrics(r, reference.provenance.path, test.provenance.path));
      } catch (e) {
        throw e instanceof MetricsError ? new InputError(e.message) : e;
      } finally {
        await workers.close();
      }
    });

  program.command('serve').argument('[dir]', 'study folder, reading kit, or a kit archive (.zip, unpacked beside itself)', '.')
    .description('serve the reading room on http://127.0.0.1 (token-protected)')
    .addOption(new Option('--port <n>', 'port (default: PORT or VEIL_PORT, else a free one)').argParser((v) => parsePort(v)))
    .option('--no-open', 'do not open a browser')
    .action(async (dir: string, o: { port?: number; open: boolean }) => {
      const { kitFolderFor, KitArchiveError } = await import('./blinding/kit-unzip.ts');
      try {
        dir = kitFolderFor(dir, (line) => io.err(`${line}\n`));
      } catch (e) {
        throw e instanceof KitArchiveError ? new InputError(e.message) : e;
      }
      await hooks.serve(dir, { port: o.port, open: o.open });
    });

  program.command('demo')
    .description('write the invented demo study (synthetic phantoms, simulated readers) and build it')
    .requiredOption('--out <dir>', 'folder to write the demo study into')
    .option('--json', 'machine-readable output')
    .action(async (o: { out: string; json?: boolean }) => {
      const { writeDemo } = await import('./demo/demo.ts');
      const s = await writeDemo(o.out, progressPrinter(io));
      if (o.json) io.out(JSON.stringify(s, null, 2) + '\n');
      else io.out(`Demo template: ${s.template}\n${await describeBuild(s.build)}Simulated readers filled ${s.simulatedAnswers} answers into the workspace (labelled simulated).\n`);
    });

  return program;
}

/** A whole-number option value of at least `min`, else a usage error (exit 2). */
function wholeNumber(v: string, min: number): number {
  const n = Number(v);
  if (!/^\d+$/.test(v) || !Number.isSafeInteger(n) || n < min) throw new InvalidArgumentError(`expected a whole number of at least ${min}, got '${v}'`);
  return n;
}

function parsePort(v: string): number {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new CommanderError(2, 'veil.port', `port must be a whole number from 0 to 65535, got '${v}'`);
  return n;
}

/** Runs the command line; returns the exit code instead of exiting, so tests can call it. */
export async function runCli(argv: string[], hooks: CliHooks, io: CliIO = defaultIO): Promise<number> {
  const program = buildProgram(hooks, io);
  program.exitOverride();
  for (const c of program.commands) c.exitOverride();
  process.exitCode = undefined;
  try {
    await program.parseAsync(argv, { from: 'user' });
    return typeof process.exitCode === 'number' ? process.exitCode : 0;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return 0;
      if (e.code === 'veil.port') io.err(`veil: ${e.message}\n`);
      return 2;
    }
    if (e instanceof TemplateError || e instanceof BuildError || e instanceof InputError) {
      io.err(`${e.message}\n`);
      return 1;
    }
    io.err(`veil: ${(e as Error).message}\n`);
    return 1;
  }
}
