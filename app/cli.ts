/**
 * The `veil` command. Human-readable output by default, `--json` for machines.
 * Exit codes: 0 success, 1 failed check or bad input (the message names what and where), 2 usage.
 * Hosts (main/) inject `serve`, so this file stays free of transports.
 */
import { Command, CommanderError, Option } from 'commander';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { loadTemplate } from './study/parse-template.ts';
import { TemplateError } from './study/template.ts';
import { resolveCases } from './study/cases.ts';
import { loadVolume } from './images/load.ts';
import { buildStudy, BuildError, type BuildProgress, type BuildSummary } from './blinding/build.ts';
import { writeDemo } from './demo/demo.ts';
import { collectBundles } from './blinding/collect.ts';
import { openWorkspace, unblindedRatings, workspacePath } from './store/workspace.ts';
import { parseTidyCsv, writeTidyCsv } from './report/tidy-csv.ts';
import { agreementByGroup, formatAgreementTable } from './stats/agreement.ts';
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

function describeBuild(s: BuildSummary): string {
  const lines = [
    `Built "${s.title}": ${s.cases} cases x ${s.methods} methods, ${s.readers} readers, ${s.itemsPerReader} items per reader in ${s.sessions} session(s).`,
    `Seed ${s.seed}, generator ${s.generator}.`,
    `Design (${s.design.presentation}): methods per session ${Object.entries(s.design.methodsBySession).map(([m, n]) => `${m} ${n.join('/')}`).join(', ')}; ` +
      `mean place in session ${Object.entries(s.design.meanPosition).map(([m, p]) => `${m} ${p.toFixed(2)}`).join(', ')}` +
      (s.design.leftCount ? `; on the left ${Object.entries(s.design.leftCount).map(([m, n]) => `${m} ${n}`).join(', ')}` : '') +
      (Number.isFinite(s.design.minSameCaseGap) ? `; items of one case at least ${s.design.minSameCaseGap} apart` : '; each case at most once a session') + '.',
    `Workspace (coordinator only, holds the key): ${s.workspace}`,
    ...s.kits.map((k) => `Kit for ${k.reader}: ${k.path} (${k.items} items; per session ${k.perSession.join(' / ')})`),
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
    .description('validate the template and every source; exit 0 only when a build would work')
    .option('--json', 'machine-readable output')
    .action(async (file: string, o: { json?: boolean }) => {
      const t = loadTemplate(file);
      const res = resolveCases(t);
      const sources: { case: string; role: string; path: string; shape?: string; error?: string }[] = [];
      for (const c of res.cases) {
        const entries: [string, string][] = [...Object.entries(c.methods), ...(c.reference ? [['reference', c.reference] as [string, string]] : [])];
        for (const [role, path] of entries) {
          try {
            const v = await loadVolume(path);
            sources.push({ case: c.caseId, role, path, shape: `${v.slices}x${v.rows}x${v.columns}` });
          } catch (e) {
            sources.push({ case: c.caseId, role, path, error: (e as Error).message });
          }
        }
      }
      const problems = [...res.problems, ...sources.filter((s) => s.error).map((s) => s.error!)];
      if (o.json) {
        io.out(JSON.stringify({ ok: problems.length === 0, template: t.file, cases: res.cases.length, ignored: res.ignored, problems, sources }, null, 2) + '\n');
      } else {
        io.out(`${t.file}: "${t.title}", ${t.methods.length} methods, ${t.questions.length} questions, ${t.readers.length} readers\n`);
        io.out(`Axis convention: a 3D .npy array is (slices, rows, columns); a 2D array is one slice.\n`);
        for (const s of sources) io.out(`  ${s.case.padEnd(12)} ${s.role.padEnd(14)} ${s.shape ?? 'ERROR'}  ${s.path}\n`);
        if (res.ignored.length) io.out(`Ignored folders (no method source): ${res.ignored.join(', ')}\n`);
        io.out(problems.length ? `${problems.length} problem(s):\n${problems.map((p) => `  - ${p}`).join('\n')}\n` : `OK: ${res.cases.length} cases ready to build.\n`);
      }
      if (problems.length) process.exitCode = 1;
    });

  program.command('build').argument('<template>', 'study template (*.study.yaml)')
    .description('import sources, write DIR/workspace.sqlite and one reading kit per reader under DIR/kits/')
    .requiredOption('--out <dir>', 'study folder to create')
    .option('--json', 'machine-readable output')
    .action(async (file: string, o: { out: string; json?: boolean }) => {
      const summary = await buildStudy(loadTemplate(file), o.out, progressPrinter(io));
      io.out(o.json ? JSON.stringify(summary, null, 2) + '\n' : describeBuild(summary));
    });

  program.command('collect').argument('<dir>', 'study folder').argument('<results...>', 'results bundles (*.veil-results.json)')
    .description('verify results bundles and unblind their answers into the workspace (one transaction)')
    .option('--json', 'machine-readable output')
    .action(async (dir: string, files: string[], o: { json?: boolean }) => {
      const results = collectBundles(dir, files);
      if (o.json) io.out(JSON.stringify({ results }, null, 2) + '\n');
      else {
        for (const r of results) {
          io.out(`${r.status.padEnd(9)} ${r.file}${r.reader ? ` (${r.reader})` : ''}${r.added ? `: ${r.added} answers added` : ''}${r.reason ? `: ${r.reason}` : ''}\n`);
        }
      }
      if (results.some((r) => r.status === 'refused' || r.status === 'conflict')) process.exitCode = 1;
    });

  program.command('report').argument('<dir>', 'study folder')
    .description('statistics, figures and tables; writes REPORT/ratings.csv (tidy ratings)')
    .requiredOption('--out <report>', 'report folder to write')
    .action(async (dir: string, o: { out: string }) => {
      const ws = openWorkspace(workspacePath(dir), { readonly: true });
      try {
        const rows = unblindedRatings(ws.db);
        mkdirSync(o.out, { recursive: true });
        const csv = join(resolve(o.out), 'ratings.csv');
        writeFileSync(csv, writeTidyCsv(rows, ['session', 'seconds', 'source']));
        const simulated = rows.filter((r) => r.source === 'simulated').length;
        io.out(`Wrote ${rows.length} ratings to ${csv}${simulated ? ` (${simulated} from simulated readers)` : ''}.\n`);
      } finally {
        ws.close();
      }
    });

  program.command('agreement').argument('<ratings>', 'tidy ratings CSV (case,reader,method,question,score)')
    .description("inter-reader agreement per method and question (Fleiss' kappa, ICC)")
    .option('--question <id>', 'only this question')
    .option('--method <id>', 'only this method')
    .option('--json', 'machine-readable output')
    .action(async (file: string, o: { question?: string; method?: string; json?: boolean }) => {
      let text: string;
      try { text = readFileSync(file, 'utf8'); } catch (e) { throw new InputError(`${file}: cannot read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`); }
      const groups = agreementByGroup(parseTidyCsv(text, file), { question: o.question, method: o.method });
      if (groups.length === 0) throw new InputError(`${file}: no ratings${o.method || o.question ? ' match the filter' : ''}`);
      io.out(o.json ? JSON.stringify({ groups }, null, 2) + '\n' : formatAgreementTable(groups));
    });

  program.command('metrics')
    .description('image metrics (PSNR, SSIM, NRMSE, HFEN) for two volumes (not built yet)')
    .option('--reference <a>').option('--test <b>').option('--json')
    .action(() => notYet('metrics'));

  program.command('serve').argument('[dir]', 'study folder or reading kit', '.')
    .description('serve the reading room on http://127.0.0.1 (token-protected)')
    .addOption(new Option('--port <n>', 'port (default: PORT or VEIL_PORT, else a free one)').argParser((v) => parsePort(v)))
    .option('--no-open', 'do not open a browser')
    .action(async (dir: string, o: { port?: number; open: boolean }) => {
      await hooks.serve(dir, { port: o.port, open: o.open });
    });

  program.command('demo')
    .description('write the invented demo study (synthetic phantoms, simulated readers) and build it')
    .requiredOption('--out <dir>', 'folder to write the demo study into')
    .option('--json', 'machine-readable output')
    .action(async (o: { out: string; json?: boolean }) => {
      const s = await writeDemo(o.out, progressPrinter(io));
      if (o.json) io.out(JSON.stringify(s, null, 2) + '\n');
      else io.out(`Demo template: ${s.template}\n${describeBuild(s.build)}Simulated readers filled ${s.simulatedAnswers} answers into the workspace (labelled simulated).\n`);
    });

  function notYet(name: string): never {
    io.err(`veil ${name}: not built yet in this version of Veil.\n`);
    throw new CommanderError(2, 'veil.notBuilt', `veil ${name} is not built yet`);
  }

  return program;
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
