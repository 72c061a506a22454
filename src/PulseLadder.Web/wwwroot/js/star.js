// Star page: one star by id, with the A/R/P shortcuts.
import { $, el, replace, queryInt } from './dom.js';
import { initShell } from './shell.js';
import { mountStar } from './starview.js';

initShell();
const id = queryInt('id');
if (id === null) replace($('#star-view'), el('p', { class: 'empty', text: 'No star chosen. Open one from a field.' }));
else {
  const view = mountStar($('#star-view'), id, { keyboard: true });
  view.ready.then(() => { if (view.detail) document.title = `${view.detail.star.star} · PulseLadder`; });
}
