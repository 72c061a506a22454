// Sign-in page: served without an account, so it loads nothing else from the server but the style sheet.
(() => {
  const form = document.getElementById('signin-form');
  const error = document.getElementById('signin-error');
  const button = document.getElementById('signin-btn');

  /** Only a path on this server: never an absolute or protocol-relative address (open redirect). */
  function returnPath() {
    const r = new URLSearchParams(location.search).get('return');
    return r && r.startsWith('/') && !r.startsWith('//') && !r.startsWith('/\\') ? r : '/index.html';
  }

  function show(message) {
    error.textContent = message;
    error.hidden = false;
  }

  form.addEventListener('submit', async (ev) => {
    ev.preventDefault();
    error.hidden = true;
    const name = document.getElementById('name').value.trim();
    const password = document.getElementById('password').value;
    if (!name || !password) { show('Enter your name and password.'); return; }
    button.disabled = true;
    try {
      const res = await fetch('/api/v1/session', {
        method: 'POST',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify({ name, password }),
      });
      if (res.ok) { location.assign(returnPath()); return; }
      const body = await res.json().catch(() => null);
      show(res.status === 429 ? 'Too many attempts; wait a minute and try again.' : (body?.detail || `Sign-in failed (${res.status}).`));
    } catch {
      show('Server not reachable.');
    } finally {
      button.disabled = false;
    }
  });
})();
