/**
 * Agreement statistics at study scale: 20 readers x 500 cases x 4 methods x 4 questions
 * (160,000 ratings, invented and seeded), every statistic of `veil agreement` with 2,000 bootstrap
 * resamples, against R psych computing ICC and Cohen's kappa (all reader pairs) on the same groups
 * in the same run. Goal: under 2 s, and faster than R.
 *
 * Both sides start from the ratings in memory (Veil: tidy rows; R: a data frame) and include
 * building each group's cases x readers matrix. Reading the CSV is timed apart for both.
 * Run alone with `npx tsx test/bench/agreement.ts`.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { streamFor } from '../../app/blinding/streams.ts';
import { parseTidyCsv, writeTidyCsv, type TidyRow } from '../../app/report/tidy-csv.ts';
import { agreementReport } from '../../app/stats/agreement.ts';
import { fmt } from './stats.ts';
// @ts-expect-error a plain ES module of the launchers, without types
import { withoutHugePages } from '../../bin/huge-pages.mjs';

const READERS = 20;
const CASES = 500;
const METHODS = ['m-a', 'm-b', 'm-c', 'm-d'];
const QUESTIONS = ['q1', 'q2', 'q3', 'q4'];
const RESAMPLES = 2000;

/** Invented ratings: case-method truth + reader bias + noise, rounded to a 1..5 scale. */
function inventRatings(): TidyRow[] {
  const rng = streamFor(2024, 'bench-agreement');
  const normal = (): number => {
    const u = 1 - rng.nextDouble();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.nextDouble());
  };
  const bias = Array.from({ length: READERS }, () => 0.4 * normal());
  const rows: TidyRow[] = [];
  for (let c = 0; c < CASES; c++) {
    for (const [mi, method] of METHODS.entries()) {
      for (const question of QUESTIONS) {
        const truth = 3 + 0.3 * mi - 0.45 + normal();
        for (let r = 0; r < READERS; r++) {
          const score = Math.min(5, Math.max(1, Math.round(truth + bias[r] + 0.7 * normal())));
          rows.push({ case: `c${String(c).padStart(3, '0')}`, reader: `r${String(r).padStart(2, '0')}`, method, question, score });
        }
      }
    }
  }
  return rows;
}

// psych::ICC(lmer = FALSE) fits aov() with a dense design matrix; on the pooled groups
// (2000 images x 20 readers) that takes minutes and gigabytes, so R is timed on the 16
// per-method groups and Veil is timed on the same 16 groups for the ratio.
const R_SCRIPT = String.raw`
suppressPackageStartupMessages(library(psych))
args <- commandArgs(trailingOnly = TRUE)
t_read <- system.time(d <- read.csv(args[1], stringsAsFactors = FALSE))[["elapsed"]]
wide <- function(s) unname(tapply(s$score, list(s$case, s$reader), function(v) v[1]))
t_compute <- system.time({
  out <- list()
  for (m in unique(d$method)) for (q in unique(d$question)) {
    x <- wide(d[d$method == m & d$question == q, ])
    icc <- psych::ICC(x, lmer = FALSE)
    ck <- suppressWarnings(psych::cohen.kappa(x))
    out[[length(out) + 1]] <- c(icc$results$ICC[2], ck$av.kappa)
  }
})[["elapsed"]]
cat(sprintf('{"read_s": %f, "compute_s": %f, "groups": %d, "version": "%s, psych %s"}\n', t_read, t_compute, length(out),
            R.version.string, as.character(packageVersion("psych"))))
`;

/** Wall and CPU milliseconds of a call. */
function timed<T>(f: () => T): { value: T; wall: number; cpu: number } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const value = f();
  const wall = performance.now() - t0;
  const c = process.cpuUsage(c0);
  return { value, wall, cpu: (c.user + c.system) / 1000 };
}

export async function bench(): Promise<string[]> {
  const rows = inventRatings();
  const scales = Object.fromEntries(QUESTIONS.map((q) => [q, { points: 5 }]));
  const dir = mkdtempSync(join(tmpdir(), 'veil-bench-agreement-'));
  try {
    const csv = join(dir, 'ratings.csv');
    const text = writeTidyCsv(rows);
    writeFileSync(csv, text);

    // Warm-up on a slice: the first run pays for compiling the hot loops.
    agreementReport(rows.slice(0, 20_000), { scales, bootstrap: 200 });
    const full = timed(() => agreementReport(rows, { scales, bootstrap: RESAMPLES, seed: 1 }));
    const perMethod = timed(() => METHODS.map((method) => agreementReport(rows, { scales, method, bootstrap: RESAMPLES, seed: 1 })));
    const parse = timed(() => parseTidyCsv(text, csv, { scales }));
    const report = full.value;

    const rScript = join(dir, 'psych.R');
    writeFileSync(rScript, R_SCRIPT);
    const tR = performance.now();
    const r = spawnSync('Rscript', [rScript, csv], { encoding: 'utf8', env: withoutHugePages() });
    const rWallMs = performance.now() - tR;
    const lines = [
      `agreement: ${rows.length.toLocaleString('en')} ratings (${READERS} readers x ${CASES} cases x ${METHODS.length} methods x ${QUESTIONS.length} questions), ` +
        `${report.groups.length} groups incl. ${QUESTIONS.length} pooled; every statistic, ${RESAMPLES} bootstrap resamples ` +
        `(machine load average ${loadavg()[0].toFixed(1)} on ${cpus().length} cores)`,
      `  Veil, all ${report.groups.length} groups: ${fmt(full.wall)} wall, ${fmt(full.cpu)} CPU (goal < 2 s: ${full.wall < 2000 ? 'met' : 'NOT met'})`,
      `  Veil, reading the tidy CSV: ${fmt(parse.wall)} wall`,
    ];
    if (r.status !== 0) {
      lines.push(`  R psych: not measured (${r.error ? r.error.message : r.stderr.trim().split('\n').pop()})`);
      return lines;
    }
    const ref = JSON.parse(r.stdout.trim().split('\n').pop() as string) as { read_s: number; compute_s: number; groups: number; version: string };
    const rMs = ref.compute_s * 1000;
    lines.push(
      `  Veil, the ${ref.groups} per-method groups: ${fmt(perMethod.wall)} wall, ${fmt(perMethod.cpu)} CPU`,
      `  R psych ICC + cohen.kappa, the same ${ref.groups} groups (${ref.version}): ${fmt(rMs)} elapsed ` +
        `(plus ${fmt(ref.read_s * 1000)} read.csv; Rscript ${fmt(rWallMs)} in all)`,
      `  ratio Veil (every statistic) / R psych (ICC and Cohen only), same groups: ${(perMethod.wall / rMs).toFixed(3)}x — ` +
        `${perMethod.wall < rMs ? 'faster than R' : 'NOT faster than R'}`,
    );
    return lines;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const line of await bench()) console.log(line);
}
