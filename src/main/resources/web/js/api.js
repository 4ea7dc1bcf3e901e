// Requests to this service. When the service asks for a read token (401), the page asks the person
// for one (through the asker main.js installs), keeps it in sessionStorage for this browser session
// only, and sends it as `Authorization: Bearer` on every request from then on. Without tokens
// configured on the service no header is sent and nothing is asked.

const TOKEN_KEY = 'wayhold.token';

let token = readStoredToken();
/** (reason) => Promise<string>: asks the person for a token; installed by main.js. */
let askToken = null;
/** The question being asked, shared by every request that got a 401 with the same token. */
let asking = null;
/** Service clock minus this browser's clock (s), from the Date header of the latest reply. */
let clockOffsetS = 0;

function readStoredToken() {
  try {
    return sessionStorage.getItem(TOKEN_KEY) || '';
  } catch (e) {
    return ''; // storage off (some private windows): the token then lives as long as the page
  }
}

function storeToken(value) {
  token = value;
  try {
    if (value) sessionStorage.setItem(TOKEN_KEY, value);
    else sessionStorage.removeItem(TOKEN_KEY);
  } catch (e) {
    // As above.
  }
}

export const hasToken = () => token !== '';

/** Forgets the token (this page and the browser session). The next refused request asks again. */
export function forgetToken() {
  storeToken('');
}

/** Installs the function that asks the person for a token: (reason: string) => Promise<string>. */
export function setTokenAsker(fn) {
  askToken = fn;
}

export const vehiclePath = (id) => '/v1/vehicles/' + encodeURIComponent(id);

/** The service's clock now, UTC epoch seconds (this browser's clock corrected by the last Date header). */
export const serverNowS = () => Date.now() / 1000 + clockOffsetS;

function noteDate(res) {
  const date = Date.parse(res.headers.get('Date') || '');
  // The header has whole seconds: an offset under 2 s is as likely rounding as skew.
  if (Number.isFinite(date)) {
    const offset = date / 1000 - Date.now() / 1000;
    clockOffsetS = Math.abs(offset) < 2 ? 0 : offset;
  }
}

/**
 * Waits for a usable token after a 401 to a request sent with `sent`. Every request refused with the
 * same token waits on one question; one sent before the token changed just tries again.
 */
async function tokenAfterRefusal(sent, res) {
  if (token !== sent) return;
  if (!askToken) throw new Error('the service needs a token and this page cannot ask for one');
  if (!asking) {
    let reason = 'This service needs a token to show its vehicles.';
    if (sent) {
      reason = 'The token was not accepted.';
      try {
        const problem = await res.clone().json();
        if (problem && typeof problem.detail === 'string') reason += ` (${problem.detail})`;
      } catch (e) {
        // A refusal without problem JSON: the plain sentence is enough.
      }
    }
    asking = askToken(reason).then((value) => {
      storeToken(value.trim());
    }).finally(() => {
      asking = null;
    });
  }
  await asking;
}

/**
 * fetch() with the token and no caching; a 401 makes the page ask for a token and send again.
 * `init.signal` aborts both the request and the wait for a token.
 */
export async function authorizedFetch(path, init = {}) {
  for (;;) {
    const sent = token;
    const headers = { ...(init.headers || {}) };
    if (sent) headers.Authorization = 'Bearer ' + sent;
    const res = await fetch(path, { cache: 'no-store', ...init, headers });
    noteDate(res);
    if (res.status !== 401) return res;
    if (init.signal && init.signal.aborted) return res;
    await tokenAfterRefusal(sent, res);
    if (init.signal && init.signal.aborted) return res;
  }
}

/** GET of a JSON resource, conditional on an ETag: { status, etag, body } (body null unless 200). */
export async function getJson(path, etag) {
  const headers = { Accept: 'application/json' };
  if (etag) headers['If-None-Match'] = etag;
  const res = await authorizedFetch(path, { headers });
  if (res.status === 304) return { status: 304, etag, body: null };
  if (!res.ok) return { status: res.status, etag: null, body: null };
  return { status: res.status, etag: res.headers.get('ETag'), body: await res.json() };
}
