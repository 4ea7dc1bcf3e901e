// Text for numbers, times and durations. Units follow the pose JSON: metres, seconds, degrees.

/** A number with `digits` decimals, or a dash when it is missing or not finite. */
export const num = (v, digits) => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(digits) : '–');

/** Like num, with an explicit sign (a true minus sign, not a hyphen). */
export const signed = (v, digits) => (typeof v === 'number' && Number.isFinite(v)
  ? (v >= 0 ? '+' : '−') + Math.abs(v).toFixed(digits) : '–');

/** One decimal, without trailing zeros: SVG coordinates and short figures. */
export const f1 = (v) => (Math.round(v * 10) / 10).toString();

/**
 * Whether a time looks like UTC epoch seconds (between 2001-09-09 and 5138): vehicle clocks may also
 * count seconds from the start of a drive, which must not be shown as a date.
 */
export const isEpochSeconds = (t) => Number.isFinite(t) && t > 1e9 && t < 1e11;

/** "09:02:16.3 UTC" for epoch seconds, else null. */
function utcTime(t) {
  return isEpochSeconds(t) ? new Date(t * 1000).toISOString().slice(11, 21) + ' UTC' : null;
}

/** Vehicle clock as UTC when it looks like epoch seconds, else as plain seconds. */
export function clockText(t) {
  if (!Number.isFinite(t)) return '–';
  return utcTime(t) ?? `t = ${t.toFixed(1)} s`;
}

/** "at 09:02:16.3 UTC" for epoch-like times, else "at t = 1234.5 s". */
export function shortClock(t) {
  if (!Number.isFinite(t)) return '–';
  return 'at ' + clockText(t);
}

/** "0.2 s", "48.6 s", "2 min 05 s", "3 h 07 min". */
export function durationText(s) {
  if (!Number.isFinite(s)) return '–';
  if (s < 100) return `${s.toFixed(1)} s`;
  const whole = Math.floor(s);
  if (whole < 3600) return `${Math.floor(whole / 60)} min ${String(whole % 60).padStart(2, '0')} s`;
  return `${Math.floor(whole / 3600)} h ${String(Math.floor(whole / 60) % 60).padStart(2, '0')} min`;
}

/** Latitude and longitude on two lines with hemisphere letters (7 decimals: about 1 cm). */
export function latLonText(lat, lon) {
  if (!Number.isFinite(lat) || !Number.isFinite(lon)) return '–';
  return `${Math.abs(lat).toFixed(7)}° ${lat >= 0 ? 'N' : 'S'}\n${Math.abs(lon).toFixed(7)}° ${lon >= 0 ? 'E' : 'W'}`;
}

/** Vehicle-clock seconds from the last fix that corrected the estimate to the pose; NaN before one. */
export function sinceFixS(pose) {
  if (!pose || !Number.isFinite(pose.t) || !Number.isFinite(pose.last_fix_t)) return NaN;
  return Math.max(0, pose.t - pose.last_fix_t);
}

export function sinceFixText(pose) {
  if (!pose) return '–';
  const s = sinceFixS(pose);
  return Number.isFinite(s) ? durationText(s) : 'no fix yet';
}

/** A round length for a scale label: "0.5 m", "20 m" (values come from niceStep). */
export function metresText(m) {
  if (!Number.isFinite(m)) return '–';
  return `${m >= 1 ? Math.round(m) : Number(m.toFixed(2))} m`;
}
