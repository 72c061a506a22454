// Shared page frame: marks the current nav entry, shows who is signed in (and the single-user banner), and keeps
// the campaign-wide progress line up to date.
import { api } from './api.js';
import { el } from './dom.js';

/** The signed-in account ({name, role, auth_method, single_user}); resolved once per page. */
export const whoAmI = api.me();

const RANK = { observer: 1, reviewer: 2, admin: 3 };

/** True when the signed-in account has at least this role. */
export async function hasRole(role) {
  const me = await whoAmI.catch(() => null);
  return !!me && (RANK[me.role] ?? 0) >= RANK[role];
}

async function showAccount() {
  const bar = document.querySelector('.topbar');
  if (!bar) return;
  let me;
  try { me = await whoAmI; } catch { return; }
  const nav = bar.querySelector('nav');
  if (nav && !nav.querySelector('a[href="account.html"]')) nav.appendChild(el('a', { href: 'account.html', text: 'Account' }));
  const here = location.pathname.split('/').pop() || 'index.html';
  if (here === 'account.html') nav?.querySelector('a[href="account.html"]')?.setAttribute('aria-current', 'page');
  if (me.single_user) {
    document.body.prepend(el('div', { class: 'single-user-banner', role: 'note', id: 'single-user-banner',
      text: 'Single-user mode: no sign-in, every request on this machine acts as the admin \u201clocal\u201d. Not for a shared server.' }));
    bar.appendChild(el('div', { class: 'who' }, el('span', { text: 'local admin' })));
    return;
  }
  const out = el('button', { type: 'button', id: 'signout-btn', text: 'Sign out', on: { click: async () => {
    try { await api.signOut(); } finally { location.assign('/signin.html'); }
  } } });
  bar.appendChild(el('div', { class: 'who' }, el('span', { id: 'who-name', text: `${me.name} (${me.role})` }), out));
}

let refreshNow = () => {};

/** Asks the top bar to fetch the campaign progress at once (e.g. after an upload). */
export function refreshProgress() { refreshNow(); }

export function initShell() {
  const here = location.pathname.split('/').pop() || 'index.html';
  for (const a of document.querySelectorAll('.topbar nav a')) {
    if (a.getAttribute('href') === here) a.setAttribute('aria-current', 'page');
  }
  showAccount();
  const line = document.querySelector('.campaign-progress');
  if (!line) return;
  let timer = null;
  const tick = async () => {
    clearTimeout(timer);
    try {
      const p = await api.progress();
      line.textContent = p.stars_pending > 0
        ? `Analysing: ${p.stars_done} of ${p.stars_total} stars done`
        : `${p.stars_total} stars, all analysed`;
      timer = setTimeout(tick, p.stars_pending > 0 ? 2000 : 10000);
    } catch {
      line.textContent = 'Server not reachable';
      timer = setTimeout(tick, 10000);
    }
  };
  refreshNow = tick;
  tick();
  return () => clearTimeout(timer);
}
