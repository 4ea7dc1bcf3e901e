// End-to-end check of the live view in a real browser (headless Debian Chromium driven by playwright-core).
//
// Starts the service jar with a replay of a demo drive, opens the page twice (one page on the pose
// stream at laptop size, one at wall-display size in large type with EventSource removed so that it
// must poll), and checks what a person watching would see: the vehicle appears, its state text turns to
// "bridging" inside a tunnel and back to "aided" after it, the dead-reckoned stretch and the 95 % ellipse
// are drawn, the time since the last fix grows with the vehicle clock inside the tunnel, fix markers are
// drawn (accepted ones, the pending ones right after a tunnel exit, a gated outlier), the 95 % radius is
// shown against the 10 m alert limit, no console errors, no request leaves the service. Screenshots go
// to the --out folder.
// Prints one line per check and a closing line "e2e: N passed, N failed"; exits 1 when any check failed.
//
// Tunnel times come from sample-logs/README.md (the generator's settings for two-tunnels: a 30 s tunnel
// 135.9-165.9 s and a 90 s tunnel 225.9-315.9 s after the first sample). The same README says the fixes
// of the first 2 s after each exit are 5-15 m off; with the default gating.reacquire_fixes (4) the filter
// holds the fixes after a gap as pending until four agree, so pending markers must appear within a few
// seconds of each exit. The log has about one 20-40 m outlier every two minutes, which the 99.9 % gate
// rejects, so a gated marker must appear at some time in the drive. At 20x the first tunnel begins
// about 7 s after the replay does; a page must be showing poses before a tunnel begins to watch it. On
// a machine so loaded that neither tunnel could be watched, the run is repeated once and says so.

import { spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { chromium } from 'playwright-core';

const args = parseArgs(process.argv.slice(2));
const JAR = args.jar ?? 'target/wayhold.jar';
const LOG = args.replay ?? 'sample-logs/two-tunnels.ndjson.gz';
const SPEED = Number(args.speed ?? 20);
const OUT = args.out ?? 'target/e2e';
const CHROMIUM = process.env.CHROMIUM ?? '/usr/bin/chromium';
const TRACE = Boolean(process.env.E2E_TRACE);
const VEHICLE = 'replay';
const ATTEMPTS = 2;

/** Tunnels of two-tunnels, seconds after the first sample (sample-logs/README.md). */
const TUNNELS = [[135.9, 165.9], [225.9, 315.9]];
/** Whole drive (s): the replay is over after this. */
const DRIVE_S = 360;
/** The issue's limit on the page's weight (bytes). */
const PAGE_LIMIT_BYTES = 300 * 1024;
/** Default outage.alert_limit_m (config/wayhold.yaml), which the replay runs with (m). */
const ALERT_LIMIT_M = 10;
/** Vehicle time after a tunnel exit within which the held-back (pending) fixes fall (s; README: 2 s of multipath, then 4 agreeing fixes at 5 Hz). */
const PENDING_WITHIN_S = 5;
/** Chromium flags for this closed network (see the machine notes): no background traffic at all. */
const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking',
  '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'];
/** JVM flags that shorten start-up (the replay runs at 20x, far below what the filter can do). */
const JVM_ARGS = ['-XX:TieredStopAtLevel=1', '-XX:+UseSerialGC'];

function parseArgs(list) {
  const out = {};
  for (let i = 0; i < list.length; i += 2) out[list[i].replace(/^--/, '')] = list[i + 1];
  return out;
}

function firstSampleT(file) {
  const text = gunzipSync(readFileSync(file)).toString('utf8');
  return JSON.parse(text.slice(0, text.indexOf('\n'))).t;
}

/**
 * Starts the service on a free port; `ready` resolves with its base URL once the replay has begun.
 * Its journal goes to a fresh temporary directory, removed at the stop: the default `data/` would
 * restore the last run's vehicle at the end of its drive, and the replay would then be refused as late.
 */
function startService() {
  const dataDir = mkdtempSync(join(tmpdir(), 'wayhold-e2e-'));
  const child = spawn('java', [...JVM_ARGS, '-jar', JAR, 'serve', '--port', '0', '--data', dataDir,
    '--replay', LOG, '--speed', String(SPEED)], { stdio: ['ignore', 'pipe', 'pipe'] });
  let log = '';
  const exited = new Promise((resolve) => child.on('exit', resolve));
  const ready = new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error('service did not start within 60 s:\n' + log)), 60000);
    child.stdout.on('data', (d) => {
      log += d;
      const m = /serving on (http:\/\/[^\s]+)/.exec(log);
      if (m && /replaying \d+ samples/.test(log)) {
        clearTimeout(timer);
        resolve(m[1]);
      }
    });
    child.stderr.on('data', (d) => { log += d; });
    exited.then((code) => reject(new Error(`service exited with ${code}:\n${log}`)));
  });
  /** SIGTERM, and SIGKILL if the graceful stop takes more than 5 s. */
  async function stop() {
    if (child.exitCode === null) {
      child.kill('SIGTERM');
      const timer = setTimeout(() => child.kill('SIGKILL'), 5000);
      await exited;
      clearTimeout(timer);
    }
    rmSync(dataDir, { recursive: true, force: true });
  }
  return { ready, stop };
}

/**
 * Test-side recorder (not part of the page): logs every change of the state text, and every redraw of
 * the "since last fix" value with the list's cell for the selected vehicle and the pose time shown.
 */
const RECORDER = () => {
  window.__states = [];
  window.__since = [];
  const watch = () => {
    const el = document.getElementById('state-text');
    if (!el) return false;
    const since = document.getElementById('v-sincefix');
    new MutationObserver(() => {
      if (window.__since.length >= 20000) return;
      const cell = document.querySelector('#vehicle-rows tr[aria-selected="true"] td.since');
      window.__since.push({
        t: Number(el.dataset.t),
        state: el.textContent,
        value: since.firstChild ? since.firstChild.nodeValue : '',
        list: cell ? cell.textContent : '',
      });
    }).observe(since, { childList: true, characterData: true, subtree: true });
    const note = () => {
      const last = window.__states[window.__states.length - 1];
      const state = el.textContent;
      if (last && last.state === state) return;
      window.__states.push({
        state,
        t: Number(el.dataset.t),
        shape: document.getElementById('state-shape').getAttribute('href'),
      });
    };
    new MutationObserver(note).observe(el, { childList: true, characterData: true, subtree: true });
    note();
    return true;
  };
  if (!watch()) document.addEventListener('DOMContentLoaded', watch);
};

/**
 * Waits until the recorded states hold `state` at a vehicle time of at least `minT`, after index `from`;
 * returns that entry's index.
 */
/** Seconds from the page's duration text ("12.3 s", "2 min 05 s"); NaN for anything else. */
function durationS(text) {
  let m = /^(\d+(?:\.\d+)?) s$/.exec(text);
  if (m) return Number(m[1]);
  m = /^(\d+) min (\d+) s$/.exec(text);
  return m ? Number(m[1]) * 60 + Number(m[2]) : NaN;
}

async function waitForState(page, state, from, minT, timeoutMs) {
  const handle = await page.waitForFunction(([s, i, t]) => {
    const k = window.__states.findIndex((e, j) => j > i && e.state === s && e.t >= t);
    return k >= 0 ? k : false;
  }, [state, from, minT], { timeout: timeoutMs, polling: 50 });
  return handle.jsonValue();
}

/** One full run: browser, service, both pages, all checks. Returns { results, tooLate }. */
async function attempt(browser, t0, shots) {
  const results = [];
  const check = (name, ok, detail) => results.push({ name, ok: Boolean(ok), detail });
  let tooLate = false;
  let origin = null;
  const outside = [];
  const httpErrors = [];
  const pageBytes = new Map();

  // Contexts and pages are made before the service starts, so that loading the page is all that is
  // left to do once the replay has begun.
  const laptop = await browser.newContext({ viewport: { width: 1366, height: 768 } });
  const wall = await browser.newContext({ viewport: { width: 1920, height: 1080 } });
  for (const ctx of [laptop, wall]) {
    // Only the service may be contacted: anything else is refused and recorded.
    await ctx.route('**/*', (route) => {
      const url = route.request().url();
      if (origin && url.startsWith(origin + '/')) return route.continue();
      outside.push(url);
      return route.abort('blockedbyclient');
    });
    ctx.on('response', async (res) => {
      if (res.status() >= 400) httpErrors.push(`${res.status()} ${res.url()}`);
      const type = res.request().resourceType();
      if (['document', 'stylesheet', 'script', 'image', 'font'].includes(type) && origin && res.url().startsWith(origin)) {
        try {
          pageBytes.set(res.url(), (await res.body()).length);
        } catch (e) {
          // A body that cannot be read is counted as missing by the size check.
        }
      }
    });
  }
  async function preparePage(ctx, polling) {
    const page = await ctx.newPage();
    const errors = [];
    page.on('console', (m) => { if (m.type() === 'error') errors.push('console: ' + m.text()); });
    page.on('pageerror', (e) => errors.push('page error: ' + e.message));
    if (polling) await page.addInitScript(() => { delete window.EventSource; });
    await page.addInitScript(RECORDER);
    return { page, errors };
  }
  const live = await preparePage(laptop, false);
  const polled = await preparePage(wall, true);

  const service = startService();
  try {
    const base = await service.ready;
    const replayStarted = Date.now();
    origin = new URL(base).origin;
    const stamp = (what) => TRACE && console.log(`trace ${((Date.now() - replayStarted) / 1000).toFixed(2)} s ${what}`);
    const driveLeftMs = () => Math.max(1000, replayStarted + (DRIVE_S / SPEED) * 1000 + 15000 - Date.now());
    await Promise.all([
      live.page.goto(base + '/', { waitUntil: 'load' }),
      polled.page.goto(base + '/?large=1', { waitUntil: 'load' }),
    ]);
    stamp('pages loaded');

    // 1. The vehicle appears in the list with a state, and its pose is shown.
    const appeared = await live.page.waitForSelector(`#vehicle-rows tr[data-vehicle="${VEHICLE}"] .chip-text`, { timeout: 15000 })
      .then(() => live.page.waitForFunction(() => document.getElementById('state-text').dataset.t !== '', null, { timeout: 15000 }))
      .then(() => true, () => false);
    stamp('live page shows a pose');
    check(`vehicle '${VEHICLE}' appears in the list and its pose is shown`, appeared);
    const streaming = await live.page.waitForFunction(() => /pose stream/.test(document.getElementById('link').textContent),
      null, { timeout: 5000 }).then(() => true, () => false);
    check('the live page reads the pose stream', streaming, `link text: ${await live.page.textContent('#link')}`);
    // Fix markers: the fixes the filter accepted are drawn beside the track, and the legend counts them.
    const accepted = await live.page.waitForFunction(() => {
      const path = document.querySelector('#g-fixes-used path.fx-accepted');
      return path && Number(path.dataset.count) > 0 && Number(document.getElementById('n-accepted').textContent) > 0
        ? path.dataset.count : false;
    }, null, { timeout: 15000, polling: 100 }).then((h) => h.jsonValue(), () => null);
    check('accepted fixes are drawn as markers and counted in the legend', accepted, `accepted in the window: ${accepted}`);
    // A gated outlier may come at any time of the drive: watch for its marker from now on.
    const gatedSeen = live.page.waitForFunction(() => {
      const mark = document.querySelector('#g-fixes .fx-gated');
      return mark ? { t: Number(mark.dataset.t), title: mark.textContent, legend: document.getElementById('n-gated').textContent } : false;
    }, null, { timeout: driveLeftMs(), polling: 100 }).then((h) => h.jsonValue(), () => null);
    // The 95 % radius against the alert limit, in words and on the gauge.
    for (const [label, p] of [['stream', live], ['polling', polled]]) {
      const limit = await p.page.waitForFunction(() => {
        const text = document.getElementById('v-limit').textContent;
        return /^r95 \d+\.\d m of \d+ m limit$/.test(text) ? { text, max: document.getElementById('limit-gauge').getAttribute('aria-valuemax') } : false;
      }, null, { timeout: 15000, polling: 100 }).then((h) => h.jsonValue(), () => null);
      check(`${label}: the 95 % radius is shown against the ${ALERT_LIMIT_M} m alert limit`,
        limit && limit.text.endsWith(`of ${ALERT_LIMIT_M} m limit`) && limit.max === String(ALERT_LIMIT_M), JSON.stringify(limit));
    }
    if (shots) await live.page.screenshot({ path: join(OUT, '01-laptop-start.png') });

    // 2. Inside a tunnel the state text turns to "bridging", then back to "aided" after it and before
    // the next one. The first pose each page showed decides which tunnel it can watch in full.
    async function tunnelChecks(label, p, shotPrefix) {
      const rel = (e) => (e && Number.isFinite(e.t) ? (e.t - t0).toFixed(1) + ' s' : 'never');
      const firstShown = await p.page.waitForFunction(() => window.__states.find((e) => e.t > 0),
        null, { timeout: driveLeftMs(), polling: 50 }).then((h) => h.jsonValue(), () => null);
      const k = TUNNELS.findIndex(([from]) => firstShown && firstShown.t - t0 < from);
      if (k < 0) {
        tooLate = true;
        check(`${label}: the page was showing poses before a tunnel began`, false, `first pose at ${rel(firstShown)}`);
        return;
      }
      const tunnel = TUNNELS[k];
      let iB = -1;
      let iA = -1;
      let drawn = false;
      try {
        iB = await waitForState(p.page, 'bridging', -1, t0 + tunnel[0], driveLeftMs());
        stamp(`${label} shows bridging`);
        if (shots) await p.page.screenshot({ path: join(OUT, `${shotPrefix}-bridging-seen.png`) });
        // The plot redraws a little after the values (it is rate-limited): give it a moment.
        drawn = await p.page.waitForFunction(() => document.querySelector('#g-track path.seg-dr')
            && document.querySelector('#g-track path.mk-dr') && document.querySelector('#g-now ellipse.ell-now'),
          null, { timeout: 3000, polling: 50 }).then(() => true, () => false);
        iA = await waitForState(p.page, 'aided', iB, -Infinity, driveLeftMs());
        stamp(`${label} shows aided again`);
        if (shots) await p.page.screenshot({ path: join(OUT, `${shotPrefix}-aided-again-seen.png`) });
      } catch (e) {
        // Reported below from what was recorded.
      }
      // Fixes are fetched every second on their own: give the pending ones after the exit that long
      // and more (they stay in the 3 min track window long after).
      const exitT = t0 + tunnel[1];
      const pending = await p.page.waitForFunction(([from, to]) => {
        const marks = [...document.querySelectorAll('#g-fixes .fx-pending')].map((m) => Number(m.dataset.t));
        const after = marks.filter((t) => t >= from && t <= to);
        return after.length ? { n: after.length, legend: document.getElementById('n-pending').textContent } : false;
      }, [exitT, exitT + PENDING_WITHIN_S], { timeout: Math.min(driveLeftMs(), 20000), polling: 100 })
        .then((h) => h.jsonValue(), () => null);
      check(`${label}: pending fixes after the exit of ${`tunnel ${k + 1}`} are drawn as their own markers`,
        pending && pending.n > 0 && Number(pending.legend) >= pending.n, JSON.stringify(pending));
      const states = await p.page.evaluate(() => window.__states);
      const seen = states.filter((e) => e.t > 0).map((e) => `${e.state}@${rel(e)}`).join(' ');
      const nextStart = k + 1 < TUNNELS.length ? TUNNELS[k + 1][0] : DRIVE_S;
      const b = states[iB];
      const a = states[iA];
      const name = `tunnel ${k + 1} (${tunnel[0]}-${tunnel[1]} s)`;
      check(`${label}: state text shows 'bridging' inside ${name}`,
        b && b.t - t0 >= tunnel[0] && b.t - t0 <= tunnel[1], `first bridging at ${rel(b)}; seen: ${seen}`);
      check(`${label}: 'bridging' shows its triangle shape, a dashed dead-reckoned stretch with triangle markers and the 95 % ellipse`,
        b && b.shape === '#shape-bridging' && drawn, `${JSON.stringify(b)}, stretch drawn: ${drawn}`);
      check(`${label}: state text returns to 'aided' after ${name} and before ${k + 1 < TUNNELS.length ? 'the next one' : 'the end'}`,
        a && a.t - t0 >= tunnel[1] && a.t - t0 < nextStart, `aided again at ${rel(a)}; seen: ${seen}`);
      if (label === 'stream') {
        // The stream page redraws with (nearly) every pose, so it sees the timer run: inside the tunnel
        // the time since the last fix, in the values and in the list, grows as the vehicle clock does
        // (to within the 0.1 s the text shows, twice), and nothing resets it.
        const inside = (await p.page.evaluate(() => window.__since))
          .filter((e) => e.state === 'bridging' && e.t - t0 >= tunnel[0] && e.t - t0 <= tunnel[1])
          .map((e) => ({ t: e.t, value: durationS(e.value), list: durationS(e.list) }));
        const first = inside[0];
        const last = inside[inside.length - 1];
        const span = last && first ? last.t - first.t : 0;
        const grows = (key) => inside.length >= 2 && span >= 3 && Math.abs(last[key] - first[key] - span) <= 0.25
          && inside.every((e, i) => i === 0 || e[key] >= inside[i - 1][key]) && first[key] >= 1;
        check(`${label}: inside ${name} the time since the last fix grows with the vehicle clock, in the values and the list`,
          grows('value') && grows('list'),
          `${inside.length} redraws over ${span.toFixed(1)} s; first ${JSON.stringify(first)}, last ${JSON.stringify(last)}`);
      }
    }
    await Promise.all([
      tunnelChecks('stream', live, '02-laptop'),
      tunnelChecks('polling', polled, '03-wall-large'),
    ]);
    const pollLink = await polled.page.textContent('#link');
    check('the page without EventSource falls back to polling', /polling/.test(pollLink), `link text: ${pollLink}`);
    // The window's name must not promise more track than is drawn: the drive is shorter than 10 min,
    // so the widest window says how much is held.
    await live.page.selectOption('#window-select', '600');
    const note = await live.page.waitForFunction(() => {
      const text = document.getElementById('window-note').textContent;
      return /^\d+(\.\d)? min held$/.test(text) ? text : false;
    }, null, { timeout: 5000, polling: 100 }).then((h) => h.jsonValue(), () => null);
    check('a track shorter than the chosen window says how much of it is held',
      note && parseFloat(note) > 0 && parseFloat(note) < 10, `note: ${note}`);

    // 3. Screenshots of the long tunnel and of the end of the drive (not checks: whether 90 s without
    // fixes passes the alert limit depends on the filter's tuning).
    if (shots) {
      const long = await live.page.waitForFunction(() => document.getElementById('state-text').textContent === 'unreliable',
        null, { timeout: driveLeftMs(), polling: 50 }).then(() => true, () => false);
      if (long) await live.page.screenshot({ path: join(OUT, '04-laptop-long-tunnel.png') });
      await live.page.waitForTimeout(Math.max(0, replayStarted + (DRIVE_S / SPEED) * 1000 + 2000 - Date.now()));
      await live.page.screenshot({ path: join(OUT, '05-laptop-end.png') });
      await polled.page.screenshot({ path: join(OUT, '06-wall-large-end.png') });
      await live.page.setViewportSize({ width: 700, height: 1100 });
      await live.page.waitForTimeout(400);
      await live.page.screenshot({ path: join(OUT, '07-narrow-end.png'), fullPage: true });
    }

    const gated = await gatedSeen;
    check('a gated fix (an outlier the gate rejected) is drawn as its own marker with a tooltip',
      gated && /^gated fix/.test(gated.title) && Number(gated.legend) >= 1, JSON.stringify(gated));

    // 4. Quiet console, nothing outside the service, no failed requests, a light page.
    const errors = [...live.errors, ...polled.errors];
    check('no console errors or page errors', errors.length === 0, errors.slice(0, 5).join(' | '));
    check('no request to anything but the service', outside.length === 0, outside.slice(0, 5).join(' '));
    check('no HTTP error from the service', httpErrors.length === 0, httpErrors.slice(0, 5).join(' '));
    const total = [...pageBytes.values()].reduce((x, y) => x + y, 0);
    const files = [...pageBytes.keys()].map((u) => new URL(u).pathname).join(' ');
    check(`the page (html, css, js) weighs under ${PAGE_LIMIT_BYTES / 1024} KB`,
      pageBytes.size >= 3 && total < PAGE_LIMIT_BYTES, `${total} bytes in ${files}`);
  } finally {
    await laptop.close().catch(() => {});
    await wall.close().catch(() => {});
    await service.stop();
  }
  return { results, tooLate };
}

async function main() {
  mkdirSync(OUT, { recursive: true });
  const started = Date.now();
  const t0 = firstSampleT(LOG);
  const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS });
  let run;
  try {
    for (let n = 1; n <= ATTEMPTS; n++) {
      run = await attempt(browser, t0, true);
      if (!run.tooLate || n === ATTEMPTS) break;
      console.log(`note: attempt ${n} opened the pages after both tunnels had begun (machine too busy); running once more`);
    }
  } finally {
    await browser.close().catch(() => {});
  }
  let failed = 0;
  for (const r of run.results) {
    if (!r.ok) failed++;
    console.log(`${r.ok ? 'ok' : 'not ok'} - ${r.name}${(!r.ok || TRACE) && r.detail ? ` (${r.detail})` : ''}`);
  }
  console.log(`screenshots in ${OUT}; ran ${((Date.now() - started) / 1000).toFixed(1)} s`);
  console.log(`e2e: ${run.results.length - failed} passed, ${failed} failed`);
  process.exitCode = failed ? 1 : 0;
}

main().catch((e) => {
  console.log(`not ok - the browser test could not run (${e && e.stack ? e.stack : e})`);
  console.log('e2e: 0 passed, 1 failed');
  process.exitCode = 1;
});
