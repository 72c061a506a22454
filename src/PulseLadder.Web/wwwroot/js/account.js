// Account page: one's own API tokens; for admins also the accounts and the audit log.
import { api } from './api.js';
import { el, replace, announce, $ } from './dom.js';
import { initShell, whoAmI } from './shell.js';

initShell();

const when = (iso) => (iso ? iso.replace('T', ' ').slice(0, 19) : '\u2013');

function table(head, rows) {
  return el('div', { class: 'table-wrap' }, el('table', {},
    el('thead', {}, el('tr', {}, head.map((h) => el('th', { scope: 'col', text: h })))),
    el('tbody', {}, rows)));
}

async function loadTokens() {
  const box = $('#tokens');
  try {
    const tokens = await api.tokens();
    if (tokens.length === 0) { replace(box, el('p', { class: 'muted', text: 'No tokens yet.' })); return; }
    replace(box, table(['Label', 'Starts with', 'Created', 'Last used', 'State', ''], tokens.map((t) => el('tr', { dataset: { token: t.id } },
      el('td', { text: t.name }), el('td', { class: 'mono', text: `${t.prefix}\u2026` }), el('td', { text: when(t.created_at) }),
      el('td', { text: when(t.last_used_at) }), el('td', { text: t.revoked_at ? `revoked ${when(t.revoked_at)}` : 'live' }),
      el('td', {}, t.revoked_at ? null : el('button', { type: 'button', class: 'bad', text: 'Revoke', on: { click: async () => {
        try { await api.revokeToken(t.id); announce('Token revoked', 'ok'); loadTokens(); } catch (e) { announce(e.message, 'error'); }
      } } }))))));
  } catch (e) {
    replace(box, el('p', { class: 'notice notice-warn', text: e.status === 409 ? e.message : `Tokens not available: ${e.message}` }));
  }
}

$('#token-form').addEventListener('submit', async (ev) => {
  ev.preventDefault();
  const name = $('#token-name').value.trim();
  if (!name) { announce('Give the token a label', 'error'); return; }
  try {
    const t = await api.createToken(name);
    const once = $('#token-once');
    replace(once, el('div', { class: 'notice notice-ok' },
      el('p', { text: `Token \u201c${t.name}\u201d: copy it now, it is not shown again.` }),
      el('p', { class: 'mono token-once', id: 'new-token', text: t.token })));
    once.hidden = false;
    $('#token-name').value = '';
    loadTokens();
  } catch (e) { announce(e.message, 'error'); }
});

async function loadUsers() {
  const users = await api.users();
  replace($('#users'), table(['Name', 'Role', 'Created', 'Password', 'State', 'Change'], users.map((u) => {
    const role = el('select', { 'aria-label': `Role of ${u.name}` },
      ['observer', 'reviewer', 'admin'].map((r) => el('option', { value: r, text: r, selected: r === u.role })));
    const save = (change, done) => api.updateUser(u.name, change).then(() => { announce(done, 'ok'); loadUsers(); }, (e) => announce(e.message, 'error'));
    role.addEventListener('change', () => save({ role: role.value }, `${u.name} is now ${role.value}`));
    const reset = el('button', { type: 'button', text: 'Reset password', on: { click: () => {
      const pw = prompt(`New password for ${u.name} (12+ characters):`);
      if (pw) save({ password: pw }, `Password of ${u.name} reset`);
    } } });
    const toggle = el('button', { type: 'button', class: u.disabled ? 'good' : 'bad', text: u.disabled ? 'Enable' : 'Disable',
      on: { click: () => save({ disabled: !u.disabled }, `${u.name} ${u.disabled ? 'enabled' : 'disabled'}`) } });
    return el('tr', { dataset: { user: u.name } }, el('td', { text: u.name }), el('td', {}, role), el('td', { text: when(u.created_at) }),
      el('td', { text: u.has_password ? 'set' : 'none (token-only)' }), el('td', { text: u.disabled ? `disabled ${when(u.disabled_at)}` : 'active' }),
      el('td', {}, el('div', { class: 'actions' }, reset, toggle)));
  })));
}

$('#user-form').addEventListener('submit', async (ev) => {
  ev.preventDefault();
  const body = { name: $('#user-name').value.trim(), role: $('#user-role').value, password: $('#user-password').value || null };
  try {
    await api.createUser(body);
    announce(`Account ${body.name} created`, 'ok');
    $('#user-name').value = ''; $('#user-password').value = '';
    loadUsers();
  } catch (e) {
    const detail = e.problem?.errors && !Array.isArray(e.problem.errors) ? Object.values(e.problem.errors).flat().join('; ') : e.message;
    announce(detail || e.message, 'error');
  }
});

let oldest = null;
async function loadAudit(more) {
  const page = await api.audit(more ? oldest : null);
  const rows = page.items.map((a) => el('tr', {}, el('td', { class: 'nowrap', text: when(a.at) }), el('td', { text: a.actor }),
    el('td', { class: 'mono', text: a.action }), el('td', { text: a.subject }), el('td', { text: a.detail })));
  if (!more) replace($('#audit'), table(['When (UTC)', 'Who', 'Action', 'Subject', 'Detail'], rows));
  else $('#audit tbody').append(...rows);
  oldest = page.next_before;
  $('#audit-more').hidden = !oldest;
}
$('#audit-more').addEventListener('click', () => loadAudit(true).catch((e) => announce(e.message, 'error')));

(async () => {
  const me = await whoAmI;
  $('#me-line').textContent = me.single_user ? 'Single-user mode: the local admin, no stored account.' : `Signed in as ${me.name}, ${me.role}.`;
  loadTokens();
  if (me.role === 'admin') {
    $('#admin').hidden = false;
    loadUsers().catch((e) => announce(e.message, 'error'));
    loadAudit(false).catch((e) => announce(e.message, 'error'));
  }
})();
