// The drift report in a real browser (headless Debian Chromium driven by playwright-core): scores two
// demo drives with the jar, opens report.html from the file system and checks what a reader sees first
// (the caution, what made the report: tool, command line, date, inputs with their rejected lines),
// that the summary and comparison tables hold one number per cell, that the windows planned but not
// scored are listed with their reasons, that the page fetches nothing and logs no error; then takes
// screenshots of the top of the report, the drift plot, every window, and the windows not scored.
// Prints one line per check and "report e2e: N passed, N failed"; exits 1 when any check failed.

import { spawnSync } from 'node:child_process';
import { mkdirSync, statSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';

const args = {};
for (let i = 2; i < process.argv.length; i += 2) args[process.argv[i].replace(/^--/, '')] = process.argv[i + 1];
const JAR = args.jar ?? 'target/wayhold.jar';
const OUT = args.out ?? 'target/e2e';
const CHROMIUM = process.env.CHROMIUM ?? '/usr/bin/chromium';
const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking',
  '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'];
/** Two demo drives and two configurations, so that every section of the report has content. */
const LOGS = ['sample-logs/two-tunnels.ndjson.gz', 'sample-logs/open-sky.ndjson.gz'];

async function main() {
  mkdirSync(OUT, { recursive: true });
  const results = [];
  const check = (name, ok, detail) => results.push({ name, ok: Boolean(ok), detail });
  const dir = resolve(OUT, 'report');
  const strict = join(OUT, 'strict.yaml');
  writeFileSync(strict, 'gating:\n  chi_square_probability: 0.99\n');
  const run = spawnSync('java', ['-jar', JAR, 'score', ...LOGS, '--outage', '10,30,60', '--every', '30',
    '--min-aided', '30', '--config', 'config/wayhold.yaml', '--config', strict, '--out', dir, '--quiet'],
  { encoding: 'utf8' });
  check('score writes the report of two demo drives and two configurations', run.status === 0,
    `exit ${run.status}: ${run.stderr}`);
  const file = join(dir, 'report.html');
  const bytes = statSync(file).size;

  const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS });
  try {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const fetched = [];
    await ctx.route('**/*', (route) => {
      const url = route.request().url();
      if (url === pathToFileURL(file).href) return route.continue();
      fetched.push(url);
      return route.abort('blockedbyclient');
    });
    const page = await ctx.newPage();
    const errors = [];
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });

    const top = await page.evaluate(() => ({
      caution: document.querySelector('.caution')?.textContent ?? '',
      about: document.querySelector('#about')?.innerText ?? '',
      firstH2: document.querySelector('h2')?.textContent ?? '',
    }));
    check('the caution comes first: not for vehicle control or safety functions',
      /not for vehicle control or safety functions/.test(top.caution), top.caution);
    check('the report says what made it: tool version, command line, date, and each input with its rejected lines',
      /wayhold \S+ \(commit /.test(top.about) && /wayhold score sample-logs\/two-tunnels/.test(top.about)
        && /\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ/.test(top.about) && /rejected lines/.test(top.about)
        && /two-tunnels\.ndjson\.gz/.test(top.about) && /strict\.yaml/.test(top.about) && top.firstH2 === 'This report',
      top.about.slice(0, 400));
    const cells = await page.evaluate(() => [...document.querySelectorAll('#summary td, #comparison td')]
      .map((td) => td.textContent));
    check('summary and comparison cells hold one number (or one name) each',
      cells.length > 50 && cells.every((c) => !/ \/ /.test(c) && c.split(/\s+/).filter((w) => /^[+-]?\d/.test(w)).length <= 1),
      cells.filter((c) => / \/ /.test(c)).slice(0, 3).join(' | '));
    const unscored = await page.evaluate(() => document.querySelector('#unscored')?.innerText ?? '');
    check('the windows planned but not scored are listed with their reasons',
      /planned windows? (was|were) not scored/.test(unscored) && /overlaps a real gap/.test(unscored), unscored.slice(0, 300));
    const drift = await page.evaluate(() => document.querySelector('#drift svg')?.textContent ?? '');
    check('the drift plot shows each log as well as both logs together',
      /two-tunnels\.ndjson\.gz/.test(drift) && /open-sky\.ndjson\.gz/.test(drift) && /all logs/.test(drift), drift.slice(0, 200));
    check('the page fetches nothing and logs no error', fetched.length === 0 && errors.length === 0,
      [...fetched, ...errors].slice(0, 3).join(' | '));
    check('the report weighs under 3 MB', bytes < 3 * 1024 * 1024, `${bytes} bytes`);

    await page.screenshot({ path: join(OUT, '13-report-top.png') });
    await page.locator('#drift').scrollIntoViewIfNeeded();
    await page.locator('#drift').screenshot({ path: join(OUT, '14-report-drift.png') });
    await page.evaluate(() => { document.querySelector('#windows details').open = true; });
    // Each section from its heading down.
    await page.evaluate(() => document.querySelector('#windows').scrollIntoView({ block: 'start' }));
    await page.screenshot({ path: join(OUT, '15-report-windows.png') });
    await page.evaluate(() => document.querySelector('#unscored').scrollIntoView({ block: 'start' }));
    await page.screenshot({ path: join(OUT, '16-report-unscored.png') });
  } finally {
    await browser.close().catch(() => {});
  }
  let failed = 0;
  for (const r of results) {
    if (!r.ok) failed++;
    console.log(`${r.ok ? 'ok' : 'not ok'} - ${r.name}${!r.ok && r.detail ? ` (${r.detail})` : ''}`);
  }
  console.log(`report screenshots in ${OUT}`);
  console.log(`report e2e: ${results.length - failed} passed, ${failed} failed`);
  process.exitCode = failed ? 1 : 0;
}

main().catch((e) => {
  console.log(`not ok - the report browser test could not run (${e && e.stack ? e.stack : e})`);
  console.log('report e2e: 0 passed, 1 failed');
  process.exitCode = 1;
});
