// The fleet table: every vehicle the service holds, worst first (unreliable, bridging, degraded, stale,
// then the rest), each with its state, whether it has stopped sending, the reasons the service gives,
// the time since its last fix and its 95 % radius. Clicking a row (or Enter on it) selects the vehicle.

import { getJson, serverNowS, vehiclePath } from './api.js';
import { sinceFixText } from './format.js';
import {
  knownState, radiusOf, reasonTag, reasonsOf, severity, staleTag, staleness, stateChip, worstFirst,
} from './status.js';

/** Most vehicles whose latest pose the list fetches per refresh (count), worst first. */
const LIST_POSE_CAP = 32;

const $ = (id) => document.getElementById(id);

/**
 * The fresher of a vehicle's list item and pose, field by field: a later time wins, and at the same
 * time the one received last (a vehicle that stopped sending keeps its time while `stale` turns true).
 */
function merged(e) {
  const { summary, pose } = e;
  if (!pose) return summary;
  const ts = Number.isFinite(summary.t) ? summary.t : -Infinity;
  const poseFirst = pose.t > ts || (pose.t === ts && e.poseAtMs > e.summaryAtMs);
  return poseFirst ? { ...summary, ...pose } : { ...pose, ...summary };
}

export class VehicleList {
  /**
   * @param hooks { onSelect(id): a person picked a row; onListed(): a list reply came in (before the
   *   poses of the vehicles are fetched), so that a vehicle can be selected without waiting }
   */
  constructor(hooks) {
    this.hooks = hooks;
    /** id -> { id, summary, summaryAtMs, pose, poseAtMs, etag, row, seenT, seenAtMs } */
    this.entries = new Map();
    this.selected = null;
    this.busy = false;
    /** Whether the last refresh reached the service. */
    this.serviceOk = true;
  }

  has(id) {
    return this.entries.has(id);
  }

  /** The vehicle's latest time from the list (s), or NaN. */
  latestT(id) {
    const e = this.entries.get(id);
    return e && Number.isFinite(e.summary.t) ? e.summary.t : NaN;
  }

  /** Whether the list says the vehicle has a pose. */
  hasPose(id) {
    const e = this.entries.get(id);
    return Boolean(e && e.summary.state != null);
  }

  /** Notes when the vehicle's time last moved on, as seen from this page. */
  noteSeen(e, t) {
    if (Number.isFinite(t) && !(t <= e.seenT)) {
      e.seenT = t;
      e.seenAtMs = performance.now();
    }
  }

  /** A pose of the vehicle from the live link. */
  notePose(id, pose) {
    const e = this.entries.get(id);
    if (!e || !pose) return;
    e.pose = pose;
    e.poseAtMs = performance.now();
    this.noteSeen(e, pose.t);
  }

  /**
   * What the table shows of a vehicle: the merged item, its state for drawing, and its staleness.
   * @returns {{ item, state, stale: { stale, ageS, by } }}
   */
  status(id) {
    const e = this.entries.get(id);
    if (!e) return null;
    const item = merged(e);
    const seenAgeS = (performance.now() - e.seenAtMs) / 1000;
    return { item, state: item.state == null ? 'unknown' : knownState(item.state), stale: staleness(item, seenAgeS, serverNowS()) };
  }

  /** Ids, worst first. */
  order() {
    const rows = [];
    for (const id of this.entries.keys()) {
      const s = this.status(id);
      rows.push({ id, state: s.state, stale: s.stale.stale, radiusM: radiusOf(s.item), limitM: s.item.alert_limit });
    }
    return rows.sort(worstFirst).map((r) => r.id);
  }

  /** The vehicle's rank in the worst-first order (lower is worse; js/status.js severity). */
  rank(id) {
    const s = this.status(id);
    return s ? severity(s.state, s.stale.stale) : Infinity;
  }

  /** The vehicle most in need of attention, or undefined. */
  worst() {
    return this.order()[0];
  }

  /** Fetches the list, then the latest pose of the vehicles not selected (cheap with their ETags). */
  async refresh() {
    if (this.busy) return;
    this.busy = true;
    try {
      await this.refreshList();
    } finally {
      this.busy = false;
    }
  }

  async refreshList() {
    let reply;
    try {
      reply = await getJson('/v1/vehicles');
      this.serviceOk = reply.status === 200;
    } catch (e) {
      this.serviceOk = false;
    }
    if (!reply || !reply.body) return false;
    const now = performance.now();
    const seen = new Set();
    for (const s of reply.body.vehicles || []) {
      if (typeof s.vehicle !== 'string') continue;
      seen.add(s.vehicle);
      let e = this.entries.get(s.vehicle);
      if (!e) {
        e = { id: s.vehicle, summary: s, summaryAtMs: now, pose: null, poseAtMs: 0, etag: null, row: null, seenT: -Infinity, seenAtMs: now };
        this.entries.set(s.vehicle, e);
      }
      e.summary = s;
      e.summaryAtMs = now;
      this.noteSeen(e, s.t);
    }
    for (const id of [...this.entries.keys()]) {
      if (!seen.has(id)) this.entries.delete(id);
    }
    this.hooks.onListed();
    this.render();
    let fetched = 0;
    for (const id of this.order()) {
      const e = this.entries.get(id);
      if (!e || id === this.selected || e.summary.state == null || fetched >= LIST_POSE_CAP) continue;
      fetched++;
      try {
        const r = await getJson(vehiclePath(id) + '/pose', e.etag);
        if (r.status === 200) {
          e.pose = r.body;
          e.poseAtMs = performance.now();
          e.etag = r.etag;
          this.noteSeen(e, r.body.t);
        }
      } catch (err) {
        // The next refresh tries again; the row keeps its last values.
      }
    }
    this.render();
    return true;
  }

  select(id) {
    this.selected = id;
    this.render();
  }

  render() {
    $('vehicles-empty').hidden = this.entries.size > 0;
    const rows = [];
    for (const id of this.order()) {
      const e = this.entries.get(id);
      if (!e.row) e.row = this.makeRow(id);
      this.fillRow(e);
      rows.push(e.row);
    }
    const body = $('vehicle-rows');
    // Re-append only when the order changed, so that focus and hover are not disturbed.
    const current = [...body.children];
    if (current.length !== rows.length || current.some((r, i) => r !== rows[i])) body.replaceChildren(...rows);
  }

  /** Redraws the selected vehicle's row (it changes with every pose). */
  renderSelected() {
    const e = this.entries.get(this.selected);
    if (e && e.row) this.fillRow(e);
  }

  makeRow(id) {
    const row = document.createElement('tr');
    row.className = 'row';
    row.tabIndex = 0;
    row.dataset.vehicle = id;
    row.addEventListener('click', () => this.hooks.onSelect(id));
    row.addEventListener('keydown', (ev) => {
      if (ev.key === 'Enter' || ev.key === ' ') {
        ev.preventDefault();
        this.hooks.onSelect(id);
      }
    });
    return row;
  }

  fillRow(e) {
    const { item, state, stale } = this.status(e.id);
    const row = e.row;
    row.setAttribute('aria-selected', String(e.id === this.selected));
    row.dataset.state = state;
    row.dataset.stale = String(stale.stale);

    const tdVehicle = document.createElement('td');
    tdVehicle.className = 'vid';
    const name = document.createElement('span');
    name.className = 'vid-name';
    name.textContent = e.id;
    const line = document.createElement('span');
    line.className = 'state-line';
    line.append(stateChip(state, stale.stale));
    if (stale.stale) line.append(staleTag(stale));
    const reasons = reasonsOf(item);
    if (reasons.length) {
      const list = document.createElement('span');
      list.className = 'reasons';
      for (const r of reasons) list.append(reasonTag(r));
      line.append(list);
    }
    tdVehicle.append(name, line);

    const tdSince = document.createElement('td');
    tdSince.className = 'num since';
    tdSince.textContent = item.state == null ? '–' : sinceFixText(item);
    const tdRadius = document.createElement('td');
    tdRadius.className = 'num r95';
    const radius = radiusOf(item);
    tdRadius.textContent = Number.isFinite(radius) ? `${radius.toFixed(1)} m` : '–';
    row.replaceChildren(tdVehicle, tdSince, tdRadius);
  }
}
