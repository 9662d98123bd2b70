/**
 * The agreement view of the app shows the numbers of the command line: the demo study is served,
 * the view opened from the reader picker, and every statistic of every (method, question) table,
 * with its interval, equals what `veil agreement --json` prints for the demo's ratings as
 * `veil report` exports them (same scales from the template, same bootstrap seed).
 * Screenshot: test-results/screens/agreement-view.png (and -pairs.png with a pair table open).
 */
import { expect, test } from '@playwright/test';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { REPO, makeDemo, serve, type ServedStudy } from './host.ts';
import type { AgreementReport } from '../../app/stats/agreement-types.ts';

const VEIL = join(REPO, 'bin', 'veil.mjs');
const DEMO_SEED = '90210'; // the demo template's seed, which the view uses for its bootstrap

let dir: string;
let host: ServedStudy;
let cli: AgreementReport;

function veil(args: string[]): string {
  const r = spawnSync(process.execPath, [VEIL, ...args], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`veil ${args.join(' ')} failed (${r.status}): ${r.stderr}`);
  return r.stdout;
}

test.beforeAll(async () => {
  test.setTimeout(180_000); // the demo build takes a while on a busy two-core machine
  dir = makeDemo();
  const report = join(dir, 'report-out');
  veil(['report', dir, '--out', report, '--bootstrap', '0']);
  cli = JSON.parse(veil(['agreement', join(report, 'ratings.csv'), '--json', '--template', join(dir, 'demo.study.yaml'), '--seed', DEMO_SEED]));
  host = await serve(dir);
});
test.afterAll(async () => { await host?.stop(); });

const fmt3 = (v: number | null): string => (v === null ? 'n/a' : v.toFixed(3).replace(/^-(0\.0+)$/, '$1'));

test('the agreement view shows, per question, the numbers `veil agreement --json` prints', async ({ page }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });

  await page.goto(host.url);
  await expect(page.getByTestId('to-agreement')).toBeVisible();
  await page.screenshot({ path: 'test-results/screens/agreement-link-picker.png' });
  await page.getByTestId('to-agreement').click();
  await expect(page).toHaveURL(/#\/analysis\/agreement$/);
  await expect(page.getByRole('heading', { name: 'Inter-reader agreement' })).toBeVisible();
  await expect(page.getByTestId('agreement-settings')).toContainText(`2000 resamples, seed ${DEMO_SEED} (the study's seed)`);

  // The demo: 3 methods x 3 questions, plus one pooled group per question.
  expect(cli.groups).toHaveLength(12);
  const questions = [...new Set(cli.groups.map((g) => g.question))];
  for (const q of questions) await expect(page.getByTestId(`agreement-question-${q}`)).toBeVisible();

  const checks: [string, (g: AgreementReport['groups'][number]) => { value: number | null; ci95: [number, number] | null }][] = [
    ...(['ICC(1,1)', 'ICC(2,1)', 'ICC(3,1)', 'ICC(1,k)', 'ICC(2,k)', 'ICC(3,k)'] as const).map(
      (f) => [f, (g: AgreementReport['groups'][number]) => g.icc[f]] as [string, (g: AgreementReport['groups'][number]) => { value: number | null; ci95: [number, number] | null }],
    ),
    ['fleiss', (g) => g.fleiss_kappa],
    ['alpha-nominal', (g) => g.krippendorff_alpha.nominal],
    ['alpha-ordinal', (g) => g.krippendorff_alpha.ordinal],
    ['alpha-interval', (g) => g.krippendorff_alpha.interval],
    ['ac1', (g) => g.gwet.ac1],
    ['ac2', (g) => g.gwet.ac2_quadratic],
    ['light-quadratic', (g) => g.light_kappa.quadratic],
    ['kendall', (g) => ({ value: g.kendall_w.value, ci95: null })],
    ['exact', (g) => ({ value: g.percent_agreement.exact, ci95: null })],
  ];
  let compared = 0;
  for (const g of cli.groups) {
    for (const [key, pick] of checks) {
      const want = pick(g);
      const cell = page.getByTestId(`agr-${g.question}-${g.method}-${key}`);
      // The numbers behind the cell are the command line's, to the last digit.
      expect(JSON.parse((await cell.getAttribute('data-value'))!), `${g.method}/${g.question} ${key}`).toEqual({ value: want.value, ci95: want.ci95 });
      // And the text shown is their three-decimal rounding.
      const text = (await cell.innerText()).replace(/\s+/g, ' ');
      if (key === 'exact') expect(text).toContain(want.value === null ? 'n/a' : `${(100 * want.value).toFixed(1)}%`);
      else expect(text).toContain(fmt3(want.value));
      if (want.ci95) expect(text).toContain(`[${fmt3(want.ci95[0])}, ${fmt3(want.ci95[1])}]`);
      compared++;
    }
    for (const p of g.cohen_pairs) {
      const cell = page.getByTestId(`pair-${g.question}-${g.method}-${p.readers.join('-')}-quadratic`);
      expect(JSON.parse((await cell.getAttribute('data-value'))!)).toEqual({ value: p.quadratic.value, ci95: p.quadratic.ci95 });
    }
  }
  expect(compared).toBe(12 * checks.length);

  // The Landis & Koch words are flagged as a convention.
  await expect(page.getByText(/Landis & Koch \(1977\).*A convention, not a test/)).toBeVisible();
  // Hovering tells what a value used and how missing ratings were treated.
  const first = cli.groups[0];
  await expect(page.getByTestId(`agr-${first.question}-${first.method}-fleiss`)).toHaveAttribute('title', /used · missing ratings: complete cases/);

  await page.screenshot({ path: 'test-results/screens/agreement-view.png', fullPage: false });
  await page.getByTestId(`pairs-${first.question}-*`).locator('summary').click();
  await page.getByTestId(`pairs-${first.question}-*`).scrollIntoViewIfNeeded();
  await expect(page.getByTestId(`pairs-${first.question}-*`)).toContainText('1 pair;');
  await page.screenshot({ path: 'test-results/screens/agreement-view-pairs.png' });
  expect(errors).toEqual([]);
});

test('a reading kit has no agreement view: the operation refuses, saying a kit holds no key', async ({ request }) => {
  const kit = await serve(join(dir, 'kits', 'R1'));
  try {
    const res = await request.post(`${kit.origin}/api/agreement`, { data: {}, headers: { Authorization: `Bearer ${kit.token}` } });
    expect(res.status()).toBe(403);
    expect((await res.json()).error).toMatch(/reading kit holds no key/);
  } finally {
    await kit.stop();
  }
});
