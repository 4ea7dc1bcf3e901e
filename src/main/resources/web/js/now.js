// The "Now" panel: the selected vehicle's state in words and shape, whether it has stopped sending,
// the reasons the service gives, the 95 % radius against the alert limit, and the current values.

import { clockText, durationText, latLonText, num, shortClock, signed, sinceFixS } from './format.js';
import { renderCloseup } from './closeup.js';
import { STATE_HELP, knownState, radiusOf, reasonTag, reasonsOf } from './status.js';

/** A pose this much older than its arrival on the wall clock is shown as old in the clock line (ms). */
const OLD_POSE_MS = 10000;

const $ = (id) => document.getElementById(id);

/** A value with its unit and, optionally, a second line. */
function setValue(id, main, unit, second) {
  const dd = $(id);
  dd.textContent = main;
  if (unit) {
    const u = document.createElement('span');
    u.className = 'unit';
    u.textContent = ' ' + unit;
    dd.append(u);
  }
  if (second) {
    const s = document.createElement('span');
    s.className = 'second';
    s.textContent = second;
    dd.append(s);
  }
}

const VALUE_IDS = ['v-latlon', 'v-enu', 'v-heading', 'v-speed', 'v-bias', 'v-scale', 'v-sincefix', 'v-meters', 'v-radius', 'v-time'];

/**
 * @param p the latest pose of the selected vehicle, or null
 * @param status the fleet table's view of it ({ item, stale }), or null
 * @param selected the selected vehicle's id, or null
 * @param track the TrackStore, for the close-up
 */
export function renderNow(p, status, selected, track) {
  const st = p ? knownState(p.state) : 'unknown';
  const badge = $('state-badge');
  badge.dataset.state = st;
  $('state-shape').setAttribute('href', '#shape-' + st);
  const text = $('state-text');
  text.textContent = p ? st : (selected ? 'no pose yet' : 'no data');
  text.dataset.t = p ? String(p.t) : '';
  $('state-help').textContent = selected ? STATE_HELP[st] : 'Select a vehicle.';
  renderStale(p && status ? status.stale : null);
  renderReasons(p && status ? reasonsOf(status.item) : []);
  if (!p) {
    for (const id of VALUE_IDS) setValue(id, '–');
    $('v-ellipse').textContent = '';
    renderLimit(NaN, NaN);
    renderCloseup(null, track);
    return;
  }
  setValue('v-latlon', latLonText(p.lat, p.lon));
  setValue('v-enu', `E ${num(p.east, 2)} m\nN ${num(p.north, 2)} m\nU ${num(p.up, 2)} m`);
  const sigma = Number.isFinite(p.heading_sigma_deg) ? `± ${p.heading_sigma_deg.toFixed(1)}° (1σ)` : '';
  setValue('v-heading', `${num(p.heading_deg, 1)}°`, 'from north', sigma);
  setValue('v-speed', num(p.speed, 2), 'm/s', Number.isFinite(p.speed) ? `${(p.speed * 3.6).toFixed(1)} km/h` : '');
  const biasDegS = Number.isFinite(p.gyro_bias) ? p.gyro_bias * 180 / Math.PI : NaN;
  setValue('v-bias', signed(biasDegS, 3), '°/s', Number.isFinite(p.gyro_bias) ? `${signed(p.gyro_bias * 1000, 3)} mrad/s` : '');
  setValue('v-scale', num(p.speed_scale, 4), '', Number.isFinite(p.speed_scale) ? `${signed((p.speed_scale - 1) * 100, 2)} % from 1` : '');
  const o = p.outage || {};
  const starting = p.state === 'initializing';
  const since = sinceFixS(p);
  if (Number.isFinite(since)) {
    // The vehicle clock below says whether times are UTC; this line has no room to repeat it.
    setValue('v-sincefix', durationText(since), '', `fix ${shortClock(p.last_fix_t).replace(/ UTC$/, '')}`);
  } else {
    setValue('v-sincefix', 'no fix yet', '', 'no fix has corrected the estimate');
  }
  if (o.active) {
    setValue('v-meters', num(o.meters, 1), 'm', Number.isFinite(o.seconds) ? `outage for ${durationText(o.seconds)}` : '');
  } else {
    setValue('v-meters', starting ? '–' : '0', starting ? '' : 'm');
  }
  const e = p.ellipse95 || {};
  const radius = radiusOf(p);
  setValue('v-radius', num(radius, 2), 'm');
  renderLimit(radius, p.alert_limit);
  $('v-ellipse').textContent = Number.isFinite(e.semi_major)
    ? `ellipse ${num(e.semi_major, 1)} × ${num(e.semi_minor, 1)} m at ${num(e.orientation_deg, 0)}°` : '';
  $('v-ellipse').title = `95 % ellipse: semi-axes ${num(e.semi_major, 2)} m and ${num(e.semi_minor, 2)} m, long axis ${num(e.orientation_deg, 0)}° clockwise from north`;
  renderCloseup(p, track);
}

/**
 * Staleness beside the state: the badge turns grey (a vehicle that stopped sending must not look
 * like a healthy one) and a line says for how long nothing has arrived and who says so.
 */
function renderStale(stale) {
  const badge = $('state-badge');
  const line = $('state-stale');
  const on = Boolean(stale && stale.stale);
  badge.dataset.stale = String(on);
  line.hidden = !on;
  if (!on) return;
  const age = Number.isFinite(stale.ageS) ? ` for ${durationText(stale.ageS)}` : '';
  line.querySelector('.stale-text').textContent = stale.by === 'service'
    ? `Stale: the service has received nothing${age}. Position and state are as last reported.`
    : `Stale: no new pose${age}. Position and state are as last reported.`;
}

function renderReasons(reasons) {
  const box = $('state-reasons');
  box.hidden = reasons.length === 0;
  const key = reasons.map((r) => r.code).join(' ');
  if (box.dataset.codes === key) return;
  box.dataset.codes = key;
  box.replaceChildren(...reasons.map(reasonTag));
}

/**
 * The 95 % radius against the alert limit, in words and as a bar: the bar runs to 1.5 times the
 * limit, with the limit marked, so that a radius past it still shows how far past. Past the limit
 * the fill is striped and the words say so: never colour alone.
 */
function renderLimit(radiusM, limitM) {
  const gauge = $('limit-gauge');
  const fill = $('gauge-fill');
  const status = $('v-limit-status');
  if (!Number.isFinite(radiusM) || !Number.isFinite(limitM) || limitM <= 0) {
    $('v-limit').textContent = Number.isFinite(radiusM) ? 'alert limit not given' : '–';
    status.textContent = '';
    gauge.hidden = true;
    return;
  }
  const limitText = limitM >= 10 ? limitM.toFixed(0) : String(Number(limitM.toFixed(1)));
  const share = radiusM / limitM;
  const over = share > 1;
  $('v-limit').textContent = `r95 ${radiusM.toFixed(1)} m of ${limitText} m limit`;
  status.textContent = over ? `past the limit by ${(radiusM - limitM).toFixed(1)} m`
    : `within the limit (${Math.round(share * 100)} %)`;
  status.dataset.over = String(over);
  gauge.hidden = false;
  gauge.dataset.over = String(over);
  gauge.setAttribute('aria-valuemax', limitText);
  gauge.setAttribute('aria-valuenow', radiusM.toFixed(1));
  gauge.setAttribute('aria-valuetext', `${radiusM.toFixed(1)} m of ${limitText} m`);
  const full = 1.5; // the bar's length in alert limits
  fill.style.width = `${(Math.min(share, full) / full * 100).toFixed(1)}%`;
  $('gauge-mark').style.left = `${(100 / full).toFixed(1)}%`;
  $('gauge-mark').dataset.label = `${limitText} m`;
}

/**
 * The vehicle clock, and how long ago the service received the vehicle's latest sample (when it says)
 * or else how long ago (wall clock) this page received the pose.
 *
 * @param stale the fleet table's staleness of the vehicle, or null
 */
export function renderAge(p, latestAtMs, stale) {
  if (!p) return;
  let old;
  let age;
  if (stale && stale.received) {
    old = stale.stale;
    age = `last sample ${durationText(stale.ageS)} ago`;
  } else {
    const ms = performance.now() - latestAtMs;
    old = ms > OLD_POSE_MS;
    age = old ? `no new pose for ${(ms / 1000).toFixed(0)} s` : `received ${(ms / 1000).toFixed(1)} s ago`;
  }
  setValue('v-time', clockText(p.t), '', age);
  const dd = $('v-time');
  dd.title = `t = ${p.t} s on the vehicle's clock`;
  dd.classList.toggle('stale', old);
}
