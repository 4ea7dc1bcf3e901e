// wayhold live view: vehicles, the selected vehicle's recent track in local ENU metres, and its current
// values. Data comes only from this service: the pose stream (Server-Sent Events) while it is open, and
// polling of the latest pose with its ETag when it is not; the received GNSS fixes with the filter's
// decision on each are polled on their own. Units follow the pose JSON: metres, seconds, degrees
// clockwise from north for heading and ellipse orientation, rad/s for the gyro bias.
'use strict';

(() => {
  /** How often the vehicle list is refreshed (ms). */
  const LIST_PERIOD_MS = 2000;
  /** Pose polling period when the stream is not open (ms); short enough to show a 1.5 s state. */
  const POLL_PERIOD_MS = 500;
  /** Most vehicles whose latest pose the list fetches per refresh (count). */
  const LIST_POSE_CAP = 32;
  /** Vehicle time between faint 95 % ellipses along a stretch without fixes (s). */
  const PAST_ELLIPSE_EVERY_S = 5;
  /** Smallest on-screen spacing of track markers (CSS px, before large type). */
  const MARKER_SPACING_PX = 20;
  /** Smallest span the plot shows (m), so a parked vehicle is not magnified into noise. */
  const MIN_SPAN_M = 30;
  /** Shortest time between two redraws of the plot (ms). */
  const PLOT_PERIOD_MS = 150;
  /** A pose older than this on the wall clock marks the view as stale (ms). */
  const STALE_MS = 10000;
  /** Vehicle time of the fixes shown in the close-up (s). */
  const CLOSEUP_FIX_S = 10;
  /** How often the selected vehicle's new fixes are fetched (ms). */
  const FIX_PERIOD_MS = 1000;
  /**
   * Each fetch of fixes starts this long before the newest fix held (s). A late sample makes the
   * service re-filter, and re-decide, the fixes of the last ordering.max_lag_s (2 s by default), so
   * that stretch is fetched again and replaces what the page held.
   */
  const FIX_OVERLAP_S = 3;
  /** Smallest on-screen spacing of fixes the filter used (CSS px, before large type); others are all drawn. */
  const FIX_SPACING_PX = 10;
  /**
   * The track is said to fall short of the chosen window when its first pose is more than this much
   * later than the window's start (s): a few seconds are the spacing of poses, not missing history.
   */
  const WINDOW_SHORT_S = 5;
  /** Fix outcomes, as the service names them, in drawing order (rarer, more telling ones on top). */
  const OUTCOMES = ['accepted', 'initializing', 'reacquired', 'unusable', 'pending', 'gated'];
  /** Outcomes that corrected or started the estimate: many, so thinned on screen. */
  const USED = new Set(['accepted', 'initializing', 'reacquired']);
  const OUTCOME_TEXT = {
    accepted: 'accepted fix',
    initializing: 'fix used to start',
    reacquired: 'fix reacquired after a gap',
    pending: 'pending fix (held back after a gap)',
    gated: 'gated fix (rejected by the chi-square gate)',
    unusable: 'fix without a position solution',
  };

  const STATES = ['initializing', 'aided', 'degraded', 'bridging', 'unreliable'];
  const STATE_HELP = {
    initializing: 'Waiting for the first fix and a heading.',
    aided: 'GNSS fixes are in use.',
    degraded: 'Fixes arrive but are rejected or poor; leaning on dead reckoning.',
    bridging: 'No usable fix: dead reckoning, 95 % radius within the alert limit.',
    unreliable: 'No usable fix and the 95 % radius is past the alert limit.',
    unknown: 'No pose yet.',
  };
  // Track stretch class per state: how a stretch is drawn (line style and marker shape).
  const STRETCH = { initializing: 'initializing', aided: 'aided', degraded: 'degraded', bridging: 'dr', unreliable: 'bad' };

  const $ = (id) => document.getElementById(id);
  const SVG_NS = 'http://www.w3.org/2000/svg';

  const view = {
    vehicles: new Map(), // id -> { summary, pose, etag, row }
    selected: null,
    track: [], // poses of the selected vehicle, time-ordered
    fixes: [], // fixes of the selected vehicle with the filter's decisions, time-ordered
    fixGen: 0, // bumped whenever the held fixes are dropped, so that a fetch in flight is ignored
    fixBusy: false,
    latest: null,
    latestAtMs: 0,
    windowS: 180,
    source: null,
    streamOpen: false,
    pollTimer: 0,
    pollEtag: null,
    pollBusy: false,
    selectGen: 0,
    renderQueued: false,
    plotTimer: 0,
    plotAtMs: -Infinity,
    serviceOk: true,
  };

  // ---------- formatting ----------

  const num = (v, digits) => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(digits) : '–');
  const signed = (v, digits) => (typeof v === 'number' && Number.isFinite(v) ? (v >= 0 ? '+' : '−') + Math.abs(v).toFixed(digits) : '–');
  const knownState = (s) => (STATES.includes(s) ? s : 'unknown');

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

  function latLonText(lat, lon) {
    if (!Number.isFinite(lat) || !Number.isFinite(lon)) return '–';
    return `${Math.abs(lat).toFixed(7)}° ${lat >= 0 ? 'N' : 'S'}\n${Math.abs(lon).toFixed(7)}° ${lon >= 0 ? 'E' : 'W'}`;
  }

  /** Vehicle clock as UTC when it looks like epoch seconds (after 2001), else as plain seconds. */
  function clockText(t) {
    if (!Number.isFinite(t)) return '–';
    if (t > 1e9 && t < 1e11) return new Date(t * 1000).toISOString().slice(11, 21) + ' UTC';
    return `t = ${t.toFixed(1)} s`;
  }

  /** Vehicle-clock seconds from the last fix that corrected the estimate to the pose; NaN before one. */
  function sinceFixS(pose) {
    if (!pose || !Number.isFinite(pose.t) || !Number.isFinite(pose.last_fix_t)) return NaN;
    return Math.max(0, pose.t - pose.last_fix_t);
  }

  /** "0.2 s", "48.6 s", "2 min 05 s". */
  function durationText(s) {
    if (!Number.isFinite(s)) return '–';
    if (s < 100) return `${s.toFixed(1)} s`;
    const whole = Math.floor(s);
    return `${Math.floor(whole / 60)} min ${String(whole % 60).padStart(2, '0')} s`;
  }

  function sinceFixText(pose) {
    if (!pose) return '–';
    const s = sinceFixS(pose);
    return Number.isFinite(s) ? durationText(s) : 'no fix yet';
  }

  function chip(state) {
    const st = knownState(state);
    const span = document.createElement('span');
    span.className = 'chip';
    span.dataset.state = st;
    const svg = document.createElementNS(SVG_NS, 'svg');
    svg.setAttribute('aria-hidden', 'true');
    const use = document.createElementNS(SVG_NS, 'use');
    use.setAttribute('href', '#shape-' + st);
    svg.append(use);
    const text = document.createElement('span');
    text.className = 'chip-text';
    text.textContent = st === 'unknown' ? 'no pose' : st;
    span.append(svg, text);
    return span;
  }

  // ---------- HTTP ----------

  const vehiclePath = (id) => '/v1/vehicles/' + encodeURIComponent(id);

  async function getJson(path, etag) {
    const headers = { Accept: 'application/json' };
    if (etag) headers['If-None-Match'] = etag;
    const res = await fetch(path, { cache: 'no-store', headers });
    if (res.status === 304) return { status: 304, etag, body: null };
    if (!res.ok) return { status: res.status, etag: null, body: null };
    return { status: res.status, etag: res.headers.get('ETag'), body: await res.json() };
  }

  function setLink(mode, text) {
    const link = $('link');
    link.dataset.mode = mode;
    link.textContent = text;
  }

  function updateLink() {
    if (!view.serviceOk) setLink('offline', 'service not reachable');
    else if (!view.selected) setLink('connecting', 'connected, no vehicle selected');
    else if (view.streamOpen) setLink('stream', 'live: pose stream');
    else if (view.pollTimer) setLink('polling', `live: polling every ${POLL_PERIOD_MS / 1000} s`);
    else setLink('connecting', 'opening the pose stream…');
  }

  // ---------- vehicle list ----------

  async function refreshList() {
    let reply;
    try {
      reply = await getJson('/v1/vehicles');
      view.serviceOk = reply.status === 200;
    } catch (e) {
      view.serviceOk = false;
    }
    updateLink();
    if (!reply || !reply.body) return;
    const seen = new Set();
    const summaries = reply.body.vehicles || [];
    for (const s of summaries) {
      seen.add(s.vehicle);
      let v = view.vehicles.get(s.vehicle);
      if (!v) {
        v = { summary: s, pose: null, etag: null, row: null };
        view.vehicles.set(s.vehicle, v);
      }
      v.summary = s;
    }
    for (const id of [...view.vehicles.keys()]) {
      if (!seen.has(id)) view.vehicles.delete(id);
    }
    if (!view.selected || !view.vehicles.has(view.selected)) {
      const wanted = new URLSearchParams(location.hash.slice(1)).get('vehicle');
      const first = view.vehicles.has(wanted) ? wanted : view.vehicles.keys().next().value;
      if (first !== undefined) select(first);
      else if (view.selected) select(null);
    }
    renderList();
    // The list carries no outage timer, so fetch each vehicle's pose (cheap with its ETag).
    let fetched = 0;
    for (const [id, v] of view.vehicles) {
      if (id === view.selected || v.summary.state == null || fetched >= LIST_POSE_CAP) continue;
      fetched++;
      try {
        const r = await getJson(vehiclePath(id) + '/pose', v.etag);
        if (r.status === 200) {
          v.pose = r.body;
          v.etag = r.etag;
        }
      } catch (e) {
        // The next refresh tries again; the row keeps its last values.
      }
    }
    renderList();
  }

  function renderList() {
    const body = $('vehicle-rows');
    $('vehicles-empty').hidden = view.vehicles.size > 0;
    const rows = [];
    for (const [id, v] of view.vehicles) {
      const pose = id === view.selected && view.latest ? view.latest : v.pose;
      const state = pose ? pose.state : v.summary.state;
      const radius = pose ? pose.radius95 ?? (pose.ellipse95 && pose.ellipse95.semi_major) : v.summary.radius95;
      if (!v.row) {
        v.row = document.createElement('tr');
        v.row.className = 'row';
        v.row.tabIndex = 0;
        v.row.dataset.vehicle = id;
        v.row.addEventListener('click', () => select(id));
        v.row.addEventListener('keydown', (e) => {
          if (e.key === 'Enter' || e.key === ' ') {
            e.preventDefault();
            select(id);
          }
        });
      }
      const row = v.row;
      row.setAttribute('aria-selected', String(id === view.selected));
      row.dataset.state = knownState(state);
      const tdId = document.createElement('td');
      tdId.className = 'vid';
      tdId.textContent = id;
      const tdState = document.createElement('td');
      tdState.append(chip(state));
      const tdSince = document.createElement('td');
      tdSince.className = 'num since';
      tdSince.textContent = pose ? sinceFixText(pose) : (v.summary.outage_active ? 'outage' : '–');
      const tdRadius = document.createElement('td');
      tdRadius.className = 'num';
      tdRadius.textContent = Number.isFinite(radius) ? `${radius.toFixed(1)} m` : '–';
      row.replaceChildren(tdId, tdState, tdSince, tdRadius);
      rows.push(row);
    }
    body.replaceChildren(...rows);
  }

  // ---------- selected vehicle: stream, polling, track ----------

  function select(id) {
    if (id === view.selected) return;
    view.selectGen++;
    closeStream();
    stopPolling();
    view.selected = id;
    view.track = [];
    dropFixes();
    view.latest = null;
    view.latestAtMs = 0;
    view.pollEtag = null;
    $('now-vehicle').textContent = id ? `· ${id}` : '';
    if (id) {
      history.replaceState(null, '', '#vehicle=' + encodeURIComponent(id));
      openStream(id);
      loadTrack(id, view.selectGen);
      fetchFixes();
    }
    updateLink();
    renderList();
    scheduleRender();
  }

  /** Fills the track window from the history; poses already received from the stream are kept. */
  async function loadTrack(id, gen, fromT) {
    const v = view.vehicles.get(id);
    let from = fromT;
    if (from === undefined) {
      const t = v && v.summary ? v.summary.t : null;
      if (!Number.isFinite(t)) return;
      from = t - view.windowS;
    }
    try {
      const r = await getJson(`${vehiclePath(id)}/track?from=${encodeURIComponent(from.toFixed(3))}`);
      if (gen !== view.selectGen || r.status !== 200) return;
      mergePoses(r.body.poses || []);
    } catch (e) {
      // A gap in the drawn history is acceptable; live poses keep arriving.
    }
  }

  // ---------- selected vehicle: fixes ----------

  function dropFixes() {
    view.fixes = [];
    view.fixGen++;
  }

  /**
   * Fetches the fixes since the newest one held (less FIX_OVERLAP_S), or the whole track window when
   * none is held, and replaces the held ones from the start of the fetched stretch on.
   */
  async function fetchFixes() {
    const id = view.selected;
    if (!id || view.fixBusy) return;
    const gen = view.selectGen;
    const fixGen = view.fixGen;
    let from;
    if (view.fixes.length) {
      from = view.fixes[view.fixes.length - 1].t - FIX_OVERLAP_S;
    } else {
      const v = view.vehicles.get(id);
      const t = view.latest ? view.latest.t : v && v.summary ? v.summary.t : null;
      if (!Number.isFinite(t)) return; // no pose yet: nothing to draw fixes beside
      from = t - view.windowS;
    }
    view.fixBusy = true;
    try {
      const r = await getJson(`${vehiclePath(id)}/fixes?from=${encodeURIComponent(from.toFixed(3))}`);
      if (gen !== view.selectGen || fixGen !== view.fixGen || r.status !== 200) return;
      mergeFixes(from, r.body.fixes || []);
    } catch (e) {
      // The next period tries again from the same fix.
    } finally {
      view.fixBusy = false;
    }
  }

  function mergeFixes(from, fetched) {
    const kept = view.fixes.filter((f) => f.t < from);
    for (const f of fetched) {
      if (Number.isFinite(f.t) && f.t >= from && Number.isFinite(f.east) && Number.isFinite(f.north)) kept.push(f);
    }
    view.fixes = kept;
    trimTrack();
    schedulePlot();
  }

  function openStream(id) {
    if (typeof EventSource !== 'function') {
      startPolling();
      return;
    }
    const gen = view.selectGen;
    const es = new EventSource(vehiclePath(id) + '/stream');
    view.source = es;
    let hadError = false;
    es.addEventListener('open', () => {
      if (gen !== view.selectGen) return;
      view.streamOpen = true;
      stopPolling();
      updateLink();
      // After a reconnect, fetch what the stream missed.
      if (hadError && view.latest) loadTrack(id, gen, view.latest.t);
    });
    es.addEventListener('pose', (ev) => {
      if (gen !== view.selectGen) return;
      let pose;
      try {
        pose = JSON.parse(ev.data);
      } catch (e) {
        return;
      }
      addLivePose(pose);
    });
    es.addEventListener('error', () => {
      if (gen !== view.selectGen) return;
      hadError = true;
      view.streamOpen = false;
      updateLink();
      // EventSource retries by itself unless the server refused the stream outright.
      if (es.readyState === EventSource.CLOSED) view.source = null;
      startPolling();
    });
  }

  function closeStream() {
    if (view.source) view.source.close();
    view.source = null;
    view.streamOpen = false;
  }

  function startPolling() {
    if (view.pollTimer) return;
    view.pollTimer = setInterval(pollPose, POLL_PERIOD_MS);
    updateLink();
    pollPose();
  }

  function stopPolling() {
    clearInterval(view.pollTimer);
    view.pollTimer = 0;
    updateLink();
  }

  async function pollPose() {
    const id = view.selected;
    const gen = view.selectGen;
    if (!id || view.pollBusy) return;
    const v = view.vehicles.get(id);
    if (!v || v.summary.state == null) return; // no pose yet: the list refresh will say when there is one
    view.pollBusy = true;
    try {
      const r = await getJson(vehiclePath(id) + '/pose', view.pollEtag);
      view.serviceOk = true;
      if (gen !== view.selectGen) return;
      if (r.status === 200) {
        view.pollEtag = r.etag;
        const before = view.latest ? view.latest.t : null;
        // Fill the stretch between the last pose drawn and this one from the history.
        if (before !== null && r.body.t > before) await loadTrack(id, gen, before);
        addLivePose(r.body);
      }
    } catch (e) {
      view.serviceOk = false;
    } finally {
      view.pollBusy = false;
      updateLink();
    }
  }

  function addLivePose(pose) {
    if (!Number.isFinite(pose.t)) return;
    const tr = view.track;
    if (tr.length && pose.t <= tr[tr.length - 1].t) {
      // Same instant replaces; an older one means the service re-filtered late samples: drop the newer.
      while (tr.length && tr[tr.length - 1].t >= pose.t) tr.pop();
    }
    tr.push(pose);
    view.latest = pose;
    view.latestAtMs = performance.now();
    trimTrack();
    scheduleRender();
  }

  function mergePoses(poses) {
    if (!poses.length) return;
    const byT = new Map();
    for (const p of poses) if (Number.isFinite(p.t)) byT.set(p.t, p);
    for (const p of view.track) byT.set(p.t, p); // live poses win over history of the same instant
    view.track = [...byT.values()].sort((a, b) => a.t - b.t);
    const last = view.track[view.track.length - 1];
    if (!view.latest || last.t >= view.latest.t) {
      view.latest = last;
      view.latestAtMs = performance.now();
    }
    trimTrack();
    scheduleRender();
  }

  /** Drops poses, and fixes, older than the track window. */
  function trimTrack() {
    if (!view.latest) return;
    const from = view.latest.t - view.windowS;
    let drop = 0;
    while (drop < view.track.length && view.track[drop].t < from) drop++;
    if (drop) view.track.splice(0, drop);
    drop = 0;
    while (drop < view.fixes.length && view.fixes[drop].t < from) drop++;
    if (drop) view.fixes.splice(0, drop);
  }

  // ---------- rendering ----------

  /**
   * Values redraw on the next frame; the plot, which rebuilds every path, at most every PLOT_PERIOD_MS.
   * A replay at many times real time sends hundreds of poses a second, and a wall display or a busy
   * laptop must not spend its whole CPU redrawing a track that moves a pixel per frame.
   */
  function scheduleRender() {
    if (view.renderQueued) return;
    view.renderQueued = true;
    requestAnimationFrame(() => {
      view.renderQueued = false;
      renderNow();
      renderListSelected();
      schedulePlot();
    });
  }

  function schedulePlot() {
    if (view.plotTimer) return;
    const wait = Math.max(0, view.plotAtMs + PLOT_PERIOD_MS - performance.now());
    view.plotTimer = setTimeout(() => {
      view.plotTimer = 0;
      view.plotAtMs = performance.now();
      renderPlot();
    }, wait);
  }

  /** Only the selected row changes with every pose; the full list redraws on its own timer. */
  function renderListSelected() {
    const v = view.vehicles.get(view.selected);
    if (!v || !v.row || !view.latest) return;
    const p = view.latest;
    const st = knownState(p.state);
    if (v.row.dataset.state !== st) {
      v.row.dataset.state = st;
      v.row.children[1].replaceChildren(chip(p.state));
    }
    v.row.children[2].textContent = sinceFixText(p);
    v.row.children[3].textContent = Number.isFinite(p.radius95) ? `${p.radius95.toFixed(1)} m` : '–';
  }

  function renderNow() {
    const p = view.latest;
    const st = p ? knownState(p.state) : 'unknown';
    const badge = $('state-badge');
    badge.dataset.state = st;
    $('state-shape').setAttribute('href', '#shape-' + st);
    const text = $('state-text');
    text.textContent = p ? st : (view.selected ? 'no pose yet' : 'no data');
    text.dataset.t = p ? String(p.t) : '';
    $('state-help').textContent = view.selected ? STATE_HELP[st] : 'Select a vehicle.';
    if (!p) {
      for (const id of ['v-latlon', 'v-enu', 'v-heading', 'v-speed', 'v-bias', 'v-scale', 'v-sincefix', 'v-meters', 'v-radius', 'v-time']) setValue(id, '–');
      $('v-ellipse').textContent = '';
      renderLimit(NaN, NaN);
      renderCloseup(null);
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
    const radius = Number.isFinite(p.radius95) ? p.radius95 : e.semi_major;
    setValue('v-radius', num(radius, 2), 'm');
    renderLimit(radius, p.alert_limit);
    $('v-ellipse').textContent = `ellipse ${num(e.semi_major, 1)} × ${num(e.semi_minor, 1)} m at ${num(e.orientation_deg, 0)}°`;
    $('v-ellipse').title = `95 % ellipse: semi-axes ${num(e.semi_major, 2)} m and ${num(e.semi_minor, 2)} m, long axis ${num(e.orientation_deg, 0)}° clockwise from north`;
    renderAge();
    renderCloseup(p);
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

  /** "at 09:02:16.3 UTC" for epoch-like times, else "at t = 1234.5 s". */
  function shortClock(t) {
    if (t > 1e9 && t < 1e11) return 'at ' + new Date(t * 1000).toISOString().slice(11, 21) + ' UTC';
    return `at t = ${t.toFixed(1)} s`;
  }

  /**
   * The close-up: the last few seconds of track and the 95 % ellipse at a scale where the ellipse
   * fills about two thirds of the box, with a ring at a round distance for reading its size.
   */
  function renderCloseup(p) {
    const svg = $('closeup-svg');
    const e = p && p.ellipse95;
    if (!p || !e || !Number.isFinite(e.semi_major) || !Number.isFinite(p.east)) {
      svg.replaceChildren();
      return;
    }
    const halfM = Math.max(e.semi_major * 1.5, 3); // metres from the centre to the box edge
    const s = 100 / halfM;
    const X = (east) => (east - p.east) * s;
    const Y = (north) => -(north - p.north) * s;
    const ring = niceStep(halfM * 0.8);
    const parts = [];
    for (let r = ring; r <= halfM * 1.42; r += ring) parts.push(el('circle', { class: 'ring', r: f1(r * s) }));
    parts.push(el('path', { class: 'ring', d: 'M-100 0H100M0 -100V100' }));
    parts.push(el('text', { class: 'ring-text', x: f1(ring * s * 0.72 + 2), y: f1(-ring * s * 0.72 - 2) }, `${ring} m`));
    // Recent track in the close-up: what fits in the box, drawn with the same stretch styles.
    let d = {};
    let prevKind = null;
    let prev = null;
    for (let i = view.track.length - 1; i >= 0; i--) {
      const q = view.track[i];
      if (!Number.isFinite(q.east) || Math.abs(q.east - p.east) > halfM * 2 || Math.abs(q.north - p.north) > halfM * 2) break;
      const kind = STRETCH[q.state] || 'initializing';
      const pt = `${f1(X(q.east))} ${f1(Y(q.north))}`;
      if (kind !== prevKind) {
        d[kind] = (d[kind] || '') + (prev ? `M${prev}L${pt}` : `M${pt}`);
        prevKind = kind;
      } else {
        d[kind] += `L${pt}`;
      }
      prev = pt;
    }
    for (const kind in d) parts.push(el('path', { class: `seg seg-${kind}`, d: d[kind] }));
    // Fixes of the last CLOSEUP_FIX_S seconds that fall in the box, all of them (no thinning here).
    const near = view.fixes.filter((f) => f.t > p.t - CLOSEUP_FIX_S && f.t <= p.t
      && Math.abs(f.east - p.east) < halfM * 1.1 && Math.abs(f.north - p.north) < halfM * 1.1);
    parts.push(...fixEls(near, X, Y, 4, 0));
    const ell = ellipseEl(p, X, Y, s, 'ell-now');
    ell.dataset.state = knownState(p.state);
    parts.push(ell);
    const a = 9;
    const heading = Number.isFinite(p.heading_deg) ? p.heading_deg : 0;
    const arrow = el('path', { class: 'vehicle-mark', d: `M0 ${-a * 1.25}L${a * 0.85} ${a}L0 ${a * 0.45}L${-a * 0.85} ${a}Z`, transform: `rotate(${heading.toFixed(1)})` });
    arrow.dataset.state = knownState(p.state);
    parts.push(arrow);
    parts.push(el('text', { class: 'ring-text', x: -96, y: -86 }, 'N ↑'));
    svg.replaceChildren(...parts);
  }

  /** The vehicle clock, and how long ago (wall clock) this page received the pose. */
  function renderAge() {
    const p = view.latest;
    if (!p) return;
    const ms = performance.now() - view.latestAtMs;
    const age = ms > STALE_MS ? `no new pose for ${(ms / 1000).toFixed(0)} s` : `received ${(ms / 1000).toFixed(1)} s ago`;
    setValue('v-time', clockText(p.t), '', age);
    const dd = $('v-time');
    dd.title = `t = ${p.t} s on the vehicle's clock`;
    dd.classList.toggle('stale', ms > STALE_MS);
  }

  function niceStep(raw) {
    const p = Math.pow(10, Math.floor(Math.log10(raw)));
    const f = raw / p;
    return (f < 1.5 ? 1 : f < 3.5 ? 2 : f < 7.5 ? 5 : 10) * p;
  }

  function el(name, attrs, text) {
    const e = document.createElementNS(SVG_NS, name);
    for (const k in attrs) e.setAttribute(k, attrs[k]);
    if (text !== undefined) e.textContent = text;
    return e;
  }

  const f1 = (v) => (Math.round(v * 10) / 10).toString();

  /**
   * Says how much track is drawn when that is less than the chosen window. The service keeps
   * history.max_poses poses per vehicle (about 2 minutes at the defaults) and the page keeps only what
   * it has received since it opened, so "last 10 min" may show less; the note says so in words
   * rather than letting the window's name promise more.
   */
  function renderWindowNote() {
    const note = $('window-note');
    const tr = view.track;
    let text = '';
    if (view.latest && tr.length > 1 && tr[0].t > view.latest.t - view.windowS + WINDOW_SHORT_S) {
      text = `${f1((view.latest.t - tr[0].t) / 60)} min held`;
    }
    if (note.textContent !== text) note.textContent = text;
  }

  function renderPlot() {
    renderWindowNote();
    const box = $('plot');
    const w = box.clientWidth;
    const h = box.clientHeight;
    const pts = view.track.filter((p) => Number.isFinite(p.east) && Number.isFinite(p.north));
    const gGrid = $('g-grid');
    const gEll = $('g-ellipses');
    const gTrack = $('g-track');
    const gFixes = $('g-fixes');
    const gFixesUsed = $('g-fixes-used');
    const gNow = $('g-now');
    const gFrame = $('g-frame');
    $('plot-empty').hidden = pts.length > 0;
    if (!pts.length || w < 10 || h < 10) {
      for (const g of [gGrid, gEll, gTrack, gFixes, gFixesUsed, gNow, gFrame]) g.replaceChildren();
      renderFixCounts([]);
      return;
    }
    const scaleUi = parseFloat(getComputedStyle(document.documentElement).getPropertyValue('--scale')) || 1;
    const now = pts[pts.length - 1];
    const ell = now.ellipse95 || {};
    const reach = Number.isFinite(ell.semi_major) ? ell.semi_major : 0;

    // Bounds in metres: the track and the current 95 % ellipse, padded, at least MIN_SPAN_M wide.
    let minE = Infinity, maxE = -Infinity, minN = Infinity, maxN = -Infinity;
    for (const p of pts) {
      if (p.east < minE) minE = p.east;
      if (p.east > maxE) maxE = p.east;
      if (p.north < minN) minN = p.north;
      if (p.north > maxN) maxN = p.north;
    }
    minE = Math.min(minE, now.east - reach); maxE = Math.max(maxE, now.east + reach);
    minN = Math.min(minN, now.north - reach); maxN = Math.max(maxN, now.north + reach);
    // Fixes beside the track widen the view too, by at most a quarter of the track's span, so that an
    // outlier kilometres off does not shrink the track to a dot (it is counted in the legend anyway).
    const fixes = fixesInSpan(pts[0].t, now.t);
    const grow = Math.max(maxE - minE, maxN - minN, MIN_SPAN_M) / 4;
    const [e0, e1, n0, n1] = [minE - grow, maxE + grow, minN - grow, maxN + grow];
    for (const f of fixes) {
      if (f.east < e0 || f.east > e1 || f.north < n0 || f.north > n1) continue;
      if (f.east < minE) minE = f.east;
      if (f.east > maxE) maxE = f.east;
      if (f.north < minN) minN = f.north;
      if (f.north > maxN) maxN = f.north;
    }
    const margin = 44 * scaleUi;
    const spanE = Math.max(maxE - minE, MIN_SPAN_M);
    const spanN = Math.max(maxN - minN, MIN_SPAN_M);
    const s = Math.min((w - 2 * margin) / spanE, (h - 2 * margin) / spanN); // px per metre, same on both axes
    const cE = (minE + maxE) / 2;
    const cN = (minN + maxN) / 2;
    const X = (e) => w / 2 + (e - cE) * s;
    const Y = (n) => h / 2 - (n - cN) * s;

    // Grid: labelled lines every `step` metres.
    const step = niceStep(110 * scaleUi / s);
    const grid = [];
    const eFrom = Math.ceil((cE - w / 2 / s) / step) * step;
    const nFrom = Math.ceil((cN - h / 2 / s) / step) * step;
    let dMinor = '';
    for (let e = eFrom - step / 2; e < cE + w / 2 / s; e += step / 2) dMinor += `M${f1(X(e))} 0V${h}`;
    for (let n = nFrom - step / 2; n < cN + h / 2 / s; n += step / 2) dMinor += `M0 ${f1(Y(n))}H${w}`;
    grid.push(el('path', { class: 'grid-minor', d: dMinor }));
    let dMajor = '';
    for (let e = eFrom; e < cE + w / 2 / s; e += step) {
      dMajor += `M${f1(X(e))} 0V${h}`;
      if (X(e) < w - 60 * scaleUi) grid.push(el('text', { class: 'tick', x: f1(X(e) + 3), y: f1(13 * scaleUi) }, `${Math.round(e)} E`));
    }
    for (let n = nFrom; n < cN + h / 2 / s; n += step) {
      dMajor += `M0 ${f1(Y(n))}H${w}`;
      if (Y(n) > 30 * scaleUi && Y(n) < h - 50 * scaleUi) grid.push(el('text', { class: 'tick', x: 4, y: f1(Y(n) - 3) }, `${Math.round(n)} N`));
    }
    grid.unshift(el('path', { class: 'grid-major', d: dMajor }));
    gGrid.replaceChildren(...grid);

    // Track: one path per stretch of the same kind; each stretch starts where the last one ended.
    const paths = {};
    const marks = {};
    const ellipses = [];
    let prev = null;
    let prevKind = null;
    let lastMark = null;
    let lastEllT = -Infinity;
    const spacing = MARKER_SPACING_PX * scaleUi;
    const mr = 3.6 * scaleUi;
    for (const p of pts) {
      const kind = STRETCH[p.state] || 'initializing';
      const x = X(p.east);
      const y = Y(p.north);
      if (kind !== prevKind) {
        paths[kind] = (paths[kind] || '') + (prev ? `M${f1(X(prev.east))} ${f1(Y(prev.north))}L${f1(x)} ${f1(y)}` : `M${f1(x)} ${f1(y)}`);
        prevKind = kind;
      } else {
        paths[kind] += `L${f1(x)} ${f1(y)}`;
      }
      if (!lastMark || Math.hypot(x - lastMark[0], y - lastMark[1]) >= spacing) {
        marks[kind] = (marks[kind] || '') + markerPath(kind, x, y, mr);
        lastMark = [x, y];
      }
      if ((kind === 'dr' || kind === 'bad') && p !== now && p.ellipse95 && p.t - lastEllT >= PAST_ELLIPSE_EVERY_S) {
        ellipses.push(ellipseEl(p, X, Y, s, 'ell-past'));
        lastEllT = p.t;
      }
      if (kind !== 'dr' && kind !== 'bad') lastEllT = -Infinity;
      prev = p;
    }
    const track = [];
    for (const kind of ['initializing', 'aided', 'degraded', 'dr', 'bad']) {
      if (paths[kind]) track.push(el('path', { class: `seg seg-${kind}`, d: paths[kind] }));
    }
    for (const kind of ['initializing', 'aided', 'degraded', 'dr', 'bad']) {
      if (marks[kind]) track.push(el('path', { class: `mk-${kind}`, d: marks[kind] }));
    }
    gTrack.replaceChildren(...track);
    gEll.replaceChildren(...ellipses);
    // Fixes the filter used go beneath the track line (they lie on it, and the line's style tells the
    // state); the others above it.
    const fixMarks = fixEls(fixes, X, Y, 3.2 * scaleUi, FIX_SPACING_PX * scaleUi);
    gFixesUsed.replaceChildren(...fixMarks.filter((m) => USED.has(m.dataset.outcome)));
    gFixes.replaceChildren(...fixMarks.filter((m) => !USED.has(m.dataset.outcome)));
    renderFixCounts(fixes);

    // Now: the 95 % ellipse, a heading arrow and a label with the state in words.
    const st = knownState(now.state);
    const nowEls = [];
    if (Number.isFinite(ell.semi_major)) {
      const e = ellipseEl(now, X, Y, s, 'ell-now');
      e.dataset.state = st;
      nowEls.push(e);
    }
    const x = X(now.east);
    const y = Y(now.north);
    const a = 11 * scaleUi;
    const heading = Number.isFinite(now.heading_deg) ? now.heading_deg : 0;
    const arrow = el('path', {
      class: 'vehicle-mark',
      d: `M0 ${-a * 1.25}L${a * 0.85} ${a}L0 ${a * 0.45}L${-a * 0.85} ${a}Z`,
      transform: `translate(${f1(x)} ${f1(y)}) rotate(${heading.toFixed(1)})`,
    });
    arrow.dataset.state = st;
    nowEls.push(arrow);
    // The label goes on the side of the arrow with more room, so it never leaves the plot.
    const right = x < w * 0.62;
    const label = el('text', {
      class: 'vehicle-label',
      x: f1(right ? x + a * 1.5 : x - a * 1.5),
      y: f1(Math.max(y - a * 1.2, 16 * scaleUi)),
      'text-anchor': right ? 'start' : 'end',
    }, `${view.selected} · ${st}`);
    nowEls.push(label);
    gNow.replaceChildren(...nowEls);

    // Frame, bottom left: a north arrow and a scale bar on one plate.
    const frame = [];
    const barM = niceStep(w / s / 6);
    const barPx = barM * s;
    const na = 8 * scaleUi;
    const plateH = 34 * scaleUi;
    const px0 = 8;
    const py0 = h - plateH - 8;
    frame.push(el('rect', { class: 'frame-bg', x: px0, y: f1(py0), width: f1(barPx + na * 2 + 34 * scaleUi), height: f1(plateH), rx: 4 }));
    const nx = px0 + 8 + na;
    const ny = py0 + plateH * 0.42;
    frame.push(el('path', { class: 'north', d: `M${f1(nx)} ${f1(ny - na)}L${f1(nx + na * 0.7)} ${f1(ny + na)}L${f1(nx)} ${f1(ny + na * 0.5)}L${f1(nx - na * 0.7)} ${f1(ny + na)}Z` }));
    frame.push(el('text', { class: 'north-text', x: f1(nx), y: f1(py0 + plateH - 3), 'text-anchor': 'middle' }, 'N'));
    const bx = nx + na + 12 * scaleUi;
    const by = py0 + plateH - 8 * scaleUi;
    frame.push(el('path', { class: 'scalebar', d: `M${f1(bx)} ${f1(by - 6)}V${f1(by)}H${f1(bx + barPx)}V${f1(by - 6)}` }));
    frame.push(el('text', { class: 'scalebar-text', x: f1(bx + 3), y: f1(by - 8) }, `${barM >= 1 ? barM : barM.toFixed(1)} m`));
    gFrame.replaceChildren(...frame);
  }

  /** The held fixes from t0 to t1 (s, vehicle clock): those beside the track drawn. */
  function fixesInSpan(t0, t1) {
    return view.fixes.filter((f) => f.t >= t0 && f.t <= t1);
  }

  /**
   * SVG elements for fixes. Fixes the filter used come five a second and would smear into a band, so
   * they are drawn in one path per outcome, at least `spacing` px apart on screen; every pending,
   * gated or unusable fix is drawn, each as its own element with its time and NIS as a tooltip.
   * Each path carries data-count, the number of fixes of its outcome in the window.
   */
  function fixEls(fixes, X, Y, r, spacing) {
    const d = {};
    const count = {};
    const single = [];
    let last = null;
    for (const f of fixes) {
      const outcome = OUTCOMES.includes(f.outcome) ? f.outcome : 'unusable';
      count[outcome] = (count[outcome] || 0) + 1;
      const x = X(f.east);
      const y = Y(f.north);
      if (USED.has(outcome)) {
        if (last && Math.hypot(x - last[0], y - last[1]) < spacing) continue;
        last = [x, y];
        d[outcome] = (d[outcome] || '') + fixMarker(outcome, x, y, r);
      } else {
        const mark = el('path', { class: `fx fx-${outcome}`, d: fixMarker(outcome, x, y, r), 'data-t': String(f.t), 'data-outcome': outcome });
        const nis = Number.isFinite(f.nis) ? `, NIS ${f.nis.toFixed(1)}` : '';
        mark.append(el('title', {}, `${OUTCOME_TEXT[outcome]}, ${shortClock(f.t)}${nis}`));
        single.push(mark);
      }
    }
    const out = [];
    for (const outcome of OUTCOMES) {
      if (d[outcome]) out.push(el('path', { class: `fx fx-${outcome}`, d: d[outcome], 'data-count': String(count[outcome]), 'data-outcome': outcome }));
    }
    return out.concat(single);
  }

  /** Fix marker shapes: circle, circle with a dot, diamond, square, boxed X, bar (see the legend). */
  function fixMarker(outcome, x, y, r) {
    const circle = (rr) => `M${f1(x - rr)} ${f1(y)}a${f1(rr)} ${f1(rr)} 0 1 0 ${f1(2 * rr)} 0a${f1(rr)} ${f1(rr)} 0 1 0 ${f1(-2 * rr)} 0Z`;
    switch (outcome) {
      case 'accepted':
        return circle(r);
      case 'reacquired':
        return circle(r * 1.2) + circle(0.4);
      case 'initializing':
        return `M${f1(x)} ${f1(y - r * 1.3)}L${f1(x + r * 1.3)} ${f1(y)}L${f1(x)} ${f1(y + r * 1.3)}L${f1(x - r * 1.3)} ${f1(y)}Z`;
      case 'pending':
        return `M${f1(x - r)} ${f1(y - r)}h${f1(2 * r)}v${f1(2 * r)}h${f1(-2 * r)}Z`;
      case 'gated': {
        const g = r * 1.35;
        return `M${f1(x - g)} ${f1(y - g)}h${f1(2 * g)}v${f1(2 * g)}h${f1(-2 * g)}Z`
          + `M${f1(x - g)} ${f1(y - g)}L${f1(x + g)} ${f1(y + g)}M${f1(x + g)} ${f1(y - g)}L${f1(x - g)} ${f1(y + g)}`;
      }
      default:
        return `M${f1(x - r * 1.3)} ${f1(y)}H${f1(x + r * 1.3)}`;
    }
  }

  /** The legend's counts: fixes of each outcome beside the drawn track. */
  function renderFixCounts(fixes) {
    const count = {};
    for (const f of fixes) count[f.outcome] = (count[f.outcome] || 0) + 1;
    for (const outcome of OUTCOMES) {
      const n = $('n-' + outcome);
      const text = String(count[outcome] || 0);
      if (n.textContent !== text) n.textContent = text;
    }
  }

  /** Marker shapes per stretch kind, matching the state shapes: circle, diamond, triangle, cross. */
  function markerPath(kind, x, y, r) {
    switch (kind) {
      case 'aided':
      case 'initializing':
        return `M${f1(x - r)} ${f1(y)}a${f1(r)} ${f1(r)} 0 1 0 ${f1(2 * r)} 0a${f1(r)} ${f1(r)} 0 1 0 ${f1(-2 * r)} 0Z`;
      case 'degraded':
        return `M${f1(x)} ${f1(y - r * 1.3)}L${f1(x + r * 1.3)} ${f1(y)}L${f1(x)} ${f1(y + r * 1.3)}L${f1(x - r * 1.3)} ${f1(y)}Z`;
      case 'dr':
        return `M${f1(x)} ${f1(y - r * 1.4)}L${f1(x + r * 1.3)} ${f1(y + r)}L${f1(x - r * 1.3)} ${f1(y + r)}Z`;
      default:
        return `M${f1(x - r)} ${f1(y - r)}L${f1(x + r)} ${f1(y + r)}M${f1(x + r)} ${f1(y - r)}L${f1(x - r)} ${f1(y + r)}`;
    }
  }

  /**
   * The 95 % ellipse of a pose. orientation_deg is the major axis clockwise from north; on screen (y
   * down) an SVG rotation is clockwise too, and an unrotated rx lies along east, so rotate by
   * orientation - 90: 0 deg puts the major axis up (north), 90 deg puts it right (east).
   */
  function ellipseEl(p, X, Y, s, cls) {
    const e = p.ellipse95;
    return el('ellipse', {
      class: cls,
      cx: f1(X(p.east)),
      cy: f1(Y(p.north)),
      rx: Math.max(e.semi_major * s, 0.5).toFixed(2),
      ry: Math.max(e.semi_minor * s, 0.5).toFixed(2),
      transform: `rotate(${(e.orientation_deg - 90).toFixed(2)} ${f1(X(p.east))} ${f1(Y(p.north))})`,
    });
  }

  // ---------- controls ----------

  function setLarge(on) {
    document.documentElement.classList.toggle('large', on);
    $('large-toggle').setAttribute('aria-pressed', String(on));
    try {
      localStorage.setItem('wayhold.large', on ? '1' : '0');
    } catch (e) {
      // Storage may be off (private windows); the toggle still works for this page.
    }
    scheduleRender();
  }

  function start() {
    const params = new URLSearchParams(location.search);
    let large = params.get('large') === '1';
    try {
      if (!params.has('large')) large = localStorage.getItem('wayhold.large') === '1';
    } catch (e) {
      // As above.
    }
    setLarge(large);
    $('large-toggle').addEventListener('click', () => setLarge(!document.documentElement.classList.contains('large')));
    const sel = $('window-select');
    const w = Number(params.get('window'));
    if ([60, 180, 600].includes(w)) sel.value = String(w);
    view.windowS = Number(sel.value);
    sel.addEventListener('change', () => {
      const grow = Number(sel.value) > view.windowS;
      view.windowS = Number(sel.value);
      trimTrack();
      if (grow && view.selected && view.latest) {
        loadTrack(view.selected, view.selectGen, view.latest.t - view.windowS);
        dropFixes(); // refetched for the wider window
        fetchFixes();
      }
      scheduleRender();
    });
    window.addEventListener('hashchange', () => {
      const wanted = new URLSearchParams(location.hash.slice(1)).get('vehicle');
      if (wanted && view.vehicles.has(wanted)) select(wanted);
    });
    new ResizeObserver(scheduleRender).observe($('plot'));
    refreshList();
    setInterval(refreshList, LIST_PERIOD_MS);
    setInterval(fetchFixes, FIX_PERIOD_MS);
    setInterval(renderAge, 1000);
  }

  start();
})();
