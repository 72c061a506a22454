// Shared page frame: marks the current nav entry and keeps the campaign-wide progress line up to date.
import { api } from './api.js';

let refreshNow = () => {};

/** Asks the top bar to fetch the campaign progress at once (e.g. after an upload). */
export function refreshProgress() { refreshNow(); }

export function initShell() {
  const here = location.pathname.split('/').pop() || 'index.html';
  for (const a of document.querySelectorAll('.topbar nav a')) {
    if (a.getAttribute('href') === here) a.setAttribute('aria-current', 'page');
  }
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
