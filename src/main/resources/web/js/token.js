// Asks the person for a read token when the service refuses the page's requests (401). The token is
// typed into the page's own dialog (never put in the address, where it would end up in histories and
// logs); api.js keeps it in sessionStorage, so it lasts for this browser session only.

const $ = (id) => document.getElementById(id);

let pending = null;

function onSubmit(ev) {
  ev.preventDefault();
  const input = $('token-input');
  const value = input.value.trim();
  if (!value || !pending) {
    input.focus();
    return;
  }
  const resolve = pending;
  pending = null;
  $('token-dialog').close();
  $('token-open').hidden = true;
  resolve(value);
}

function open() {
  const dialog = $('token-dialog');
  if (!dialog.open) dialog.showModal();
  $('token-input').focus();
}

let installed = false;

function install() {
  if (installed) return;
  installed = true;
  $('token-form').addEventListener('submit', onSubmit);
  // Closed without a token (Escape): the page keeps waiting, and a button in the header opens it again.
  $('token-dialog').addEventListener('close', () => {
    if (pending) $('token-open').hidden = false;
  });
  $('token-open').addEventListener('click', open);
}

/** Shows the token dialog with `reason`; resolves with the token once one is entered. */
export function askForToken(reason) {
  install();
  $('token-reason').textContent = reason;
  $('token-input').value = '';
  const asked = new Promise((resolve) => {
    pending = resolve;
  });
  open();
  return asked;
}
