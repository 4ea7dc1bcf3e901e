// The live link to the selected vehicle: its pose stream (Server-Sent Events read through fetch, so
// that the token can go in a header, which EventSource cannot send), polling of the latest pose with
// its ETag while the stream is not open, the history that fills gaps, and the received GNSS fixes,
// polled on their own. One LiveLink per selection; a closed link ignores whatever still arrives.

import { authorizedFetch, getJson, vehiclePath } from './api.js';

/** Pose polling period when the stream is not open (ms); short enough to show a 1.5 s state. */
export const POLL_PERIOD_MS = 500;
/** How often the selected vehicle's new fixes are fetched (ms). */
const FIX_PERIOD_MS = 1000;
/**
 * Each fetch of fixes starts this long before the newest fix held (s). A late sample makes the
 * service re-filter, and re-decide, the fixes of the last ordering.max_lag_s (2 s by default), so
 * that stretch is fetched again and replaces what the page held.
 */
const FIX_OVERLAP_S = 3;
/** Wait before opening the stream again after it broke off (ms; what browsers' EventSource waits). */
const RETRY_MS = 3000;
/** Wait before asking again after the service refused the stream with an error status (ms). */
const REFUSED_RETRY_MS = 15000;

/**
 * Reads Server-Sent Events from a text stream (HTML Living Standard, "Server-sent events", event
 * stream interpretation): lines end with CRLF, LF or CR; `data` lines of one event join with LF; a
 * blank line dispatches; lines starting with a colon are comments (the service's keep-alives).
 */
export class EventStreamParser {
  constructor(onEvent) {
    this.onEvent = onEvent;
    this.buffer = '';
    this.type = '';
    this.data = [];
    this.retryMs = NaN;
  }

  push(text) {
    this.buffer += text;
    for (;;) {
      const i = this.buffer.search(/[\r\n]/);
      if (i < 0) return;
      // A CR at the very end may be the first half of a CRLF: wait for the next chunk.
      if (this.buffer[i] === '\r' && i === this.buffer.length - 1) return;
      const line = this.buffer.slice(0, i);
      const skip = this.buffer[i] === '\r' && this.buffer[i + 1] === '\n' ? 2 : 1;
      this.buffer = this.buffer.slice(i + skip);
      this.line(line);
    }
  }

  line(line) {
    if (line === '') {
      if (this.data.length) this.onEvent(this.type || 'message', this.data.join('\n'));
      this.type = '';
      this.data = [];
      return;
    }
    if (line[0] === ':') return;
    const colon = line.indexOf(':');
    const field = colon < 0 ? line : line.slice(0, colon);
    let value = colon < 0 ? '' : line.slice(colon + 1);
    if (value[0] === ' ') value = value.slice(1);
    if (field === 'event') this.type = value;
    else if (field === 'data') this.data.push(value);
    else if (field === 'retry' && /^\d+$/.test(value)) this.retryMs = Number(value);
  }
}

export class LiveLink {
  /**
   * @param id the vehicle
   * @param track the TrackStore to fill
   * @param hooks {
   *   hintT(): the vehicle's latest time from the list (s) or NaN,
   *   hasPose(): whether the list says the vehicle has a pose yet,
   *   onPoses(): poses were added, onFixes(): fixes changed,
   *   onMode(): the link's mode changed, onService(ok): whether the service answered }
   */
  constructor(id, track, hooks) {
    this.id = id;
    this.track = track;
    this.hooks = hooks;
    /** 'connecting', 'stream' or 'polling'. */
    this.mode = 'connecting';
    this.closed = false;
    this.abort = null;
    this.retryTimer = 0;
    this.pollTimer = 0;
    this.pollEtag = null;
    this.pollBusy = false;
    this.fixBusy = false;
    this.fixTimer = 0;
  }

  start() {
    this.openStream(false);
    this.loadTrack();
    this.fetchFixes();
    this.fixTimer = setInterval(() => this.fetchFixes(), FIX_PERIOD_MS);
  }

  close() {
    this.closed = true;
    if (this.abort) this.abort.abort();
    clearTimeout(this.retryTimer);
    clearInterval(this.pollTimer);
    clearInterval(this.fixTimer);
  }

  setMode(mode) {
    if (this.mode === mode) return;
    this.mode = mode;
    this.hooks.onMode();
  }

  // ---------- stream ----------

  async openStream(afterBreak) {
    if (this.closed) return;
    const abort = new AbortController();
    this.abort = abort;
    let retryMs = RETRY_MS;
    try {
      const res = await authorizedFetch(vehiclePath(this.id) + '/stream', {
        headers: { Accept: 'text/event-stream' },
        signal: abort.signal,
      });
      if (this.closed) return;
      const type = res.headers.get('Content-Type') || '';
      if (res.status === 204) return this.streamEnded(NaN); // the service asks not to reconnect
      if (res.status !== 200 || !type.startsWith('text/event-stream') || !res.body) {
        return this.streamEnded(REFUSED_RETRY_MS);
      }
      this.setMode('stream');
      this.stopPolling();
      this.hooks.onService(true);
      // After a break, fetch what the stream missed.
      if (afterBreak && this.track.latest) this.loadTrack(this.track.latest.t);
      const parser = new EventStreamParser((type, data) => this.onEvent(type, data));
      const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
      for (;;) {
        const { value, done } = await reader.read();
        if (done || this.closed) break;
        parser.push(value);
      }
      if (Number.isFinite(parser.retryMs)) retryMs = parser.retryMs;
    } catch (e) {
      // Network error or abort: below.
    }
    // Whether the service is reachable is left to polling and the list: a proxy may refuse streams only.
    this.streamEnded(retryMs);
  }

  /** The stream is not open: poll meanwhile, and open it again after retryMs (never when NaN). */
  streamEnded(retryMs) {
    if (this.closed) return;
    this.abort = null;
    this.startPolling();
    if (Number.isFinite(retryMs)) {
      clearTimeout(this.retryTimer);
      this.retryTimer = setTimeout(() => this.openStream(true), retryMs);
    }
  }

  onEvent(type, data) {
    if (this.closed || type !== 'pose') return;
    let pose;
    try {
      pose = JSON.parse(data);
    } catch (e) {
      return;
    }
    if (this.track.addLive(pose)) this.hooks.onPoses();
  }

  // ---------- polling ----------

  startPolling() {
    if (this.pollTimer || this.closed) return;
    this.pollTimer = setInterval(() => this.pollPose(), POLL_PERIOD_MS);
    this.setMode('polling');
    this.pollPose();
  }

  stopPolling() {
    clearInterval(this.pollTimer);
    this.pollTimer = 0;
  }

  async pollPose() {
    if (this.closed || this.pollBusy || !this.hooks.hasPose()) return;
    this.pollBusy = true;
    try {
      const r = await getJson(vehiclePath(this.id) + '/pose', this.pollEtag);
      if (this.closed) return;
      this.hooks.onService(r.status < 500);
      if (r.status === 200) {
        this.pollEtag = r.etag;
        const before = this.track.latest ? this.track.latest.t : null;
        // Fill the stretch between the last pose drawn and this one from the history.
        if (before !== null && r.body.t > before) await this.loadTrack(before);
        if (!this.closed && this.track.addLive(r.body)) this.hooks.onPoses();
      }
    } catch (e) {
      if (!this.closed) this.hooks.onService(false);
    } finally {
      this.pollBusy = false;
    }
  }

  // ---------- history and fixes ----------

  /** Fills the track from `fromT` (default: the window behind the list's latest time) from the history. */
  async loadTrack(fromT) {
    let from = fromT;
    if (from === undefined) {
      const t = this.hooks.hintT();
      if (!Number.isFinite(t)) return;
      from = t - this.track.windowS;
    }
    try {
      const r = await getJson(`${vehiclePath(this.id)}/track?from=${encodeURIComponent(from.toFixed(3))}`);
      if (this.closed || r.status !== 200) return;
      if (this.track.mergeHistory(r.body.poses || [])) this.hooks.onPoses();
    } catch (e) {
      // A gap in the drawn history is acceptable; live poses keep arriving.
    }
  }

  /**
   * Fetches the fixes since the newest one held (less FIX_OVERLAP_S), or the whole track window when
   * none is held, and replaces the held ones from the start of the fetched stretch on.
   */
  async fetchFixes() {
    if (this.closed || this.fixBusy) return;
    const track = this.track;
    const generation = track.fixGeneration;
    let from = track.newestFixT() - FIX_OVERLAP_S;
    if (!Number.isFinite(from)) {
      const t = track.latest ? track.latest.t : this.hooks.hintT();
      if (!Number.isFinite(t)) return; // no pose yet: nothing to draw fixes beside
      from = t - track.windowS;
    }
    this.fixBusy = true;
    try {
      const r = await getJson(`${vehiclePath(this.id)}/fixes?from=${encodeURIComponent(from.toFixed(3))}`);
      if (this.closed || generation !== track.fixGeneration || r.status !== 200) return;
      track.mergeFixes(from, r.body.fixes || []);
      this.hooks.onFixes();
    } catch (e) {
      // The next period tries again from the same fix.
    } finally {
      this.fixBusy = false;
    }
  }

  /** The window grew: fetch the older history and the fixes again for it. */
  widen() {
    if (!this.track.latest) return;
    this.loadTrack(this.track.latest.t - this.track.windowS);
    this.track.dropFixes();
    this.fetchFixes();
  }
}
