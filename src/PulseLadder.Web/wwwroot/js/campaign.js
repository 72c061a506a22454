// Campaign page: the list of fields and the upload panel (check, report, store, watch the analysis).
import { api, ApiError, TIME_SCALES } from './api.js';
import { el, replace, $, pm, kpc, announce, sleep } from './dom.js';
import { initShell, refreshProgress } from './shell.js';

initShell();

// ---------- Fields ----------
async function loadFields() {
  const box = $('#fields');
  try {
    const fields = await api.fields();
    if (!fields.length) {
      replace(box, el('p', { class: 'empty', text: 'No fields yet. Add a star list and photometry below.' }));
      return;
    }
    replace(box, fields.map(fieldCard));
  } catch (e) {
    replace(box, el('p', { class: 'notice notice-bad', text: `Could not load the fields: ${e.message}` }));
  }
}

function fieldCard(f) {
  const s = f.summary;
  return el('article', { class: 'field-card', dataset: { fieldId: f.field_id } },
    el('h3', {}, el('a', { href: `field.html?id=${f.field_id}`, text: f.name })),
    el('div', { class: 'counts' },
      el('span', { class: 'chip chip-flag', text: `${f.stars} stars` }),
      el('span', { class: 'chip chip-pending', text: `${f.analysed} analysed` }),
      el('span', { class: 'chip chip-accepted', text: `${f.accepted} accepted` }),
      el('span', { class: 'chip chip-rejected', text: `${f.rejected} rejected` }),
      el('span', { class: 'chip chip-awaiting', text: `${f.awaiting} need a look` })),
    s
      ? el('dl', { class: 'kv' },
        el('dt', { text: 'Distance modulus' }), el('dd', { class: 'field-mu', text: `${pm(s.mu, s.mu_err)} mag` }),
        el('dt', { text: 'Distance' }), el('dd', { text: kpc(s.distance_pc, s.distance_pc_err) }),
        el('dt', { text: 'Stars used' }), el('dd', { text: `${s.n_used}${s.n_clipped ? ` (${s.n_clipped} clipped)` : ''}` }))
      : el('p', { class: 'muted', text: 'No distance yet: accept stars to build one.' }));
}

// ---------- Upload ----------
const files = []; // { file, role: 'photometry' | 'stars' }
let checked = false;

const scaleSelect = $('#time-scale');
async function loadTimeScales() {
  // The server's list is the truth; the built-in names only label the codes it sends.
  const labels = Object.fromEntries(TIME_SCALES);
  let codes;
  try { codes = await api.timeScales(); } catch { codes = null; }
  if (!Array.isArray(codes) || !codes.length) codes = TIME_SCALES.map(([c]) => c);
  const preferred = codes.includes('bjd_tdb') ? 'bjd_tdb' : codes[0];
  replace(scaleSelect, codes.map((c) => el('option', { value: c, text: labels[c] ? `${labels[c]} — ${c}` : c, selected: c === preferred })));
}
loadTimeScales();

function guessRole(name) {
  return /star|list|catalog|catalogue/i.test(name) && !/phot|lc|night/i.test(name) ? 'stars' : 'photometry';
}

function addFiles(list) {
  for (const f of list) {
    if (files.some((x) => x.file.name === f.name && x.file.size === f.size)) continue;
    files.push({ file: f, role: guessRole(f.name) });
  }
  checked = false;
  renderFiles();
}

function renderFiles() {
  const ul = $('#file-list');
  replace(ul, files.map((entry, i) => {
    const id = `role-${i}`;
    return el('li', {},
      el('span', { class: 'mono', text: entry.file.name }),
      el('span', { class: 'muted', text: `${Math.max(1, Math.round(entry.file.size / 1024))} kB` }),
      el('label', { for: id, class: 'muted', text: 'holds' }),
      el('select', {
        id, on: { change: (e) => { entry.role = e.target.value; checked = false; updateButtons(); } },
      },
      el('option', { value: 'photometry', text: 'photometry', selected: entry.role === 'photometry' }),
      el('option', { value: 'stars', text: 'star list', selected: entry.role === 'stars' })),
      el('button', { type: 'button', 'aria-label': `Remove ${entry.file.name}`, on: { click: () => { files.splice(i, 1); checked = false; renderFiles(); } } }, 'Remove'));
  }));
  updateButtons();
}

function updateButtons() {
  $('#check-btn').disabled = files.length === 0;
  $('#send-btn').disabled = !checked;
}

function buildForm(preview) {
  const fd = new FormData();
  const starLists = files.filter((f) => f.role === 'stars');
  if (starLists.length > 1) throw new Error('Send one star list per upload.');
  for (const f of files) fd.append(f.role === 'stars' ? 'stars' : 'photometry', f.file, f.file.name);
  if (files.some((f) => f.role === 'photometry')) fd.append('time_scale', scaleSelect.value);
  const offset = $('#time-offset').value.trim();
  if (offset) fd.append('time_offset', offset);
  for (const [id, name] of [['#tc-star', 'star'], ['#tc-band', 'band'], ['#tc-observer', 'observer']]) {
    const v = $(id).value.trim();
    if (v) fd.append(name, v);
  }
  if (preview) fd.append('preview', 'true');
  return fd;
}

function renderErrors(err) {
  const report = $('#upload-report');
  const rows = err.errors;
  replace(report,
    el('div', { class: 'notice notice-bad', role: 'alert' },
      el('strong', { text: 'Nothing was stored. ' }), err.message),
    rows.length ? el('div', { class: 'table-wrap' }, el('table', { class: 'errors-table', id: 'row-errors' },
      el('caption', { class: 'muted', text: `${rows.length} problem${rows.length === 1 ? '' : 's'} to fix` }),
      el('thead', {}, el('tr', {}, ['File', 'Line', 'Column', 'Problem'].map((h) => el('th', { scope: 'col', text: h })))),
      el('tbody', {}, rows.slice(0, 500).map((r) => el('tr', {},
        el('td', { class: 'mono', text: r.file ?? '' }), el('td', { class: 'num', text: r.line ?? '' }),
        el('td', { text: r.column ?? '' }), el('td', { text: r.message ?? '' })))))) : null);
}

function renderPreview(res) {
  const report = $('#upload-report');
  const parts = [];
  parts.push(el('div', { class: 'notice notice-ok', role: 'status' },
    el('strong', { text: 'Files look good. ' }),
    `${res.files.reduce((a, f) => a + (f.rows ?? 0), 0)} rows in ${res.files.length} file(s); nothing stored yet.`));
  for (const f of res.files) {
    parts.push(el('h3', {}, el('span', { class: 'mono', text: f.file }), ` — ${f.kind === 'stars' ? 'star list' : f.kind}${f.format ? ` (${f.format.replaceAll('_', ' ')})` : ''}, ${f.rows} rows`,
      f.duplicate ? el('span', { class: 'chip chip-awaiting', text: 'already uploaded' }) : null));
    parts.push(el('p', {}, 'Detected columns: ',
      (f.columns ?? []).map((c) => el('span', { class: 'chip chip-flag mono', text: c })), ' '));
    for (const w of f.warnings ?? []) parts.push(el('p', { class: 'notice notice-warn', text: w }));
    const rows = f.preview ?? [];
    if (rows.length) {
      const keys = Object.keys(rows[0]);
      parts.push(el('div', { class: 'table-wrap' }, el('table', { class: 'preview-table' },
        el('thead', {}, el('tr', {}, keys.map((k) => el('th', { scope: 'col', text: k })))),
        el('tbody', {}, rows.slice(0, 10).map((r) => el('tr', {}, keys.map((k) => el('td', { text: r[k] ?? '' }))))))));
    }
  }
  replace(report, parts);
}

async function check() {
  $('#check-btn').disabled = true;
  try {
    const res = await api.upload(buildForm(true));
    renderPreview(res);
    checked = true;
  } catch (e) {
    checked = false;
    if (e instanceof ApiError) renderErrors(e);
    else replace($('#upload-report'), el('p', { class: 'notice notice-bad', role: 'alert', text: e.message }));
  }
  updateButtons();
}

async function send() {
  $('#send-btn').disabled = true;
  $('#check-btn').disabled = true;
  let res;
  try {
    res = await api.upload(buildForm(false));
  } catch (e) {
    if (e instanceof ApiError) renderErrors(e);
    else replace($('#upload-report'), el('p', { class: 'notice notice-bad', role: 'alert', text: e.message }));
    updateButtons();
    return;
  }
  const dup = res.duplicate || res.files.every((f) => f.duplicate);
  replace($('#upload-report'), el('div', { class: `notice ${dup ? 'notice-warn' : 'notice-ok'}`, role: 'status' },
    dup ? 'These files were uploaded before: nothing was added.'
      : `Stored: ${res.stars_added} new star(s), ${res.observations_added} observations; ${res.stars_queued} star(s) queued for analysis.`));
  files.length = 0;
  checked = false;
  renderFiles();
  await loadFields();
  if (res.upload_id !== null && res.upload_id !== undefined) await watch(res.upload_id);
}

async function watch(uploadId) {
  const box = $('#upload-progress');
  const bar = box.querySelector('.progress');
  const fill = bar.firstElementChild;
  box.hidden = false;
  $('#progress-label').textContent = `Upload ${uploadId}: analysing stars…`;
  let lastDone = -1;
  for (;;) {
    let st;
    try { st = await api.uploadStatus(uploadId); } catch (e) { $('#progress-text').textContent = e.message; await sleep(1500); continue; }
    const pct = st.stars_total ? Math.round((100 * st.stars_done) / st.stars_total) : 100;
    fill.style.width = `${pct}%`;
    bar.setAttribute('aria-valuenow', String(pct));
    $('#progress-text').textContent = `${st.stars_done} of ${st.stars_total} stars analysed (${pct}%)`;
    if (st.stars_done !== lastDone) { lastDone = st.stars_done; loadFields(); refreshProgress(); }
    if (st.state === 'done') {
      $('#progress-label').textContent = `Upload ${uploadId}: analysis complete`;
      box.dataset.state = 'done';
      announce('Analysis complete', 'ok');
      await loadFields();
      return;
    }
    await sleep(700);
  }
}

const dz = $('#dropzone');
dz.addEventListener('dragover', (e) => { e.preventDefault(); dz.classList.add('over'); });
dz.addEventListener('dragleave', () => dz.classList.remove('over'));
dz.addEventListener('drop', (e) => { e.preventDefault(); dz.classList.remove('over'); addFiles(e.dataTransfer.files); });
$('#file-input').addEventListener('change', (e) => { addFiles(e.target.files); e.target.value = ''; });
$('#check-btn').addEventListener('click', check);
$('#send-btn').addEventListener('click', send);
$('#clear-btn').addEventListener('click', () => { files.length = 0; checked = false; renderFiles(); replace($('#upload-report')); });
for (const id of ['#time-scale', '#time-offset', '#tc-star', '#tc-band', '#tc-observer']) {
  $(id).addEventListener('change', () => { checked = false; updateButtons(); });
}

loadFields();
