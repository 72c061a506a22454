// Review queue: the next star that needs a person (flagged first, across fields), driven by the keyboard.
import { api } from './api.js';
import { $, el, replace, announce } from './dom.js';
import { initShell } from './shell.js';
import { mountStar } from './starview.js';

initShell();

const host = $('#star-view');
const visited = []; // star ids seen, for "back"
let view = null;
let current = null;

async function show(row) {
  view?.destroy();
  view = null;
  current = row;
  if (!row) {
    replace(host, el('div', { class: 'card empty', id: 'queue-empty' },
      el('p', { text: 'Nothing needs a look right now.' }),
      el('p', {}, el('a', { href: 'index.html', text: 'Back to the campaign' }))));
    $('#queue-status').textContent = 'The queue is empty.';
    document.title = 'Review queue · PulseLadder';
    return;
  }
  $('#queue-status').textContent = `Now: ${row.star} (field ${row.field})${(row.flags ?? []).length ? ' — flagged' : ''}`;
  document.title = `${row.star} · Review queue · PulseLadder`;
  view = mountStar(host, row.star_id, {
    keyboard: true,
    onDecided: (action) => { if (action === 'accept' || action === 'reject') next(); },
  });
  host.dataset.starId = String(row.star_id);
}

let seq = 0;

async function next() {
  const mine = ++seq;
  try {
    const after = current?.star_id ?? null;
    let row = await api.next(after);
    if (mine !== seq) return; // a later key press won
    if (current) visited.push(current);
    // The server's order wraps around; stop when it hands back the star we just left.
    if (row && after !== null && row.star_id === after) row = null;
    await show(row);
  } catch (e) {
    announce(`Could not fetch the next star: ${e.message}`, 'error');
  }
}

async function back() {
  const prev = visited.pop();
  if (prev) await show(prev);
}

document.addEventListener('keydown', (e) => {
  if (e.ctrlKey || e.metaKey || e.altKey) return;
  const t = e.target;
  if (t instanceof HTMLInputElement || t instanceof HTMLTextAreaElement || t instanceof HTMLSelectElement) return;
  const k = e.key.toLowerCase();
  if (k === 'n' || k === 'j') { e.preventDefault(); next(); }
  else if (k === 'b' || k === 'k') { e.preventDefault(); back(); }
});

(async () => {
  try { await show(await api.next(null)); } catch (e) { replace(host, el('p', { class: 'notice notice-bad', text: e.message })); }
})();
