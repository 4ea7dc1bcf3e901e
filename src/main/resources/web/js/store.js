// What the page holds of the selected vehicle: its poses and the received GNSS fixes (each with the
// filter's decision) over the track window, merged from the live link, the history and the fix list.
// No drawing and no requests here. Times are seconds on the vehicle's clock.

export class TrackStore {
  /** @param windowS how much vehicle time the track keeps behind the latest pose (s) */
  constructor(windowS) {
    this.windowS = windowS;
    /** Poses, time-ordered. */
    this.poses = [];
    /** Fixes with the filter's decisions, time-ordered. */
    this.fixes = [];
    /** The newest pose, or null. */
    this.latest = null;
    /** performance.now() when the newest pose was received (ms). */
    this.latestAtMs = 0;
    /** Bumped whenever the held fixes are dropped, so that a fetch already in flight is ignored. */
    this.fixGeneration = 0;
  }

  /**
   * A pose from the live link. The same instant replaces the one held; an older one means the service
   * re-filtered late samples, so the newer poses held are dropped. Returns false for a pose without time.
   */
  addLive(pose) {
    if (!pose || !Number.isFinite(pose.t)) return false;
    const tr = this.poses;
    while (tr.length && tr[tr.length - 1].t >= pose.t) tr.pop();
    tr.push(pose);
    this.latest = pose;
    this.latestAtMs = performance.now();
    this.trim();
    return true;
  }

  /** Poses from the history; live poses of the same instant win. Returns whether any was added. */
  mergeHistory(poses) {
    if (!poses.length) return false;
    const byT = new Map();
    for (const p of poses) if (Number.isFinite(p.t)) byT.set(p.t, p);
    for (const p of this.poses) byT.set(p.t, p);
    this.poses = [...byT.values()].sort((a, b) => a.t - b.t);
    const last = this.poses[this.poses.length - 1];
    if (last && (!this.latest || last.t >= this.latest.t)) {
      this.latest = last;
      this.latestAtMs = performance.now();
    }
    this.trim();
    return true;
  }

  /** Fixes fetched from `fromT` on replace those held from that time on (the filter may have re-decided them). */
  mergeFixes(fromT, fetched) {
    const kept = this.fixes.filter((f) => f.t < fromT);
    for (const f of fetched) {
      if (Number.isFinite(f.t) && f.t >= fromT && Number.isFinite(f.east) && Number.isFinite(f.north)) kept.push(f);
    }
    this.fixes = kept;
    this.trim();
  }

  /** Forgets everything held (another vehicle was selected). */
  clear() {
    this.poses = [];
    this.latest = null;
    this.latestAtMs = 0;
    this.dropFixes();
  }

  dropFixes() {
    this.fixes = [];
    this.fixGeneration++;
  }

  /** Time of the newest fix held, or NaN. */
  newestFixT() {
    return this.fixes.length ? this.fixes[this.fixes.length - 1].t : NaN;
  }

  /** The held fixes from t0 to t1 (s). */
  fixesIn(t0, t1) {
    return this.fixes.filter((f) => f.t >= t0 && f.t <= t1);
  }

  setWindow(windowS) {
    this.windowS = windowS;
    this.trim();
  }

  /** Drops poses and fixes older than the track window. */
  trim() {
    if (!this.latest) return;
    const from = this.latest.t - this.windowS;
    let drop = 0;
    while (drop < this.poses.length && this.poses[drop].t < from) drop++;
    if (drop) this.poses.splice(0, drop);
    drop = 0;
    while (drop < this.fixes.length && this.fixes[drop].t < from) drop++;
    if (drop) this.fixes.splice(0, drop);
  }
}
