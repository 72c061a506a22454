// Field page: star table (sort, filter, search), distance summary with its error budget, PL diagram.
import { api, STATE_LABELS, CLASS_LABELS, CLASS_SHORT, classCode } from './api.js';
import { el, replace, $, num, pm, sig, kpc, queryInt } from './dom.js';
import { initShell, hasRole } from './shell.js';
import { scatter } from './plots.js';
import { budgetTable } from './budget.js';

initShell();
// Exports are for reviewers and admins (docs/security.md): observers do not get links that would answer 403.
hasRole('reviewer').then((may) => { if (!may) $('#export-actions').hidden = true; });

const fieldId = queryInt('id');
let rows = [];
let bands = [];
let summary = null;
const sort = { key: 'star', dir: 1 };

if (fieldId === null) {
  replace($('main'), el('p', { class: 'empty', text: 'No field chosen. Pick one on the Campaign page.' }));
} else {
  load();
}

async function loadAllStars() {
  const all = [];
  for (let page = 1; ; page++) {
    const res = await api.stars(fieldId, { page: String(page), page_size: '500' });
    all.push(...res.items);
    if (all.length >= res.total || res.items.length === 0) break;
  }
  return all;
}

async function load() {
  const [fields, stars, sum] = await Promise.all([api.fields(), loadAllStars(), api.summary(fieldId)]);
  const field = fields.find((f) => f.field_id === fieldId);
  const name = field?.name ?? `Field ${fieldId}`;
  $('#field-name').textContent = name;
  document.title = `${name} · PulseLadder`;
  if (field) {
    $('#field-counts').textContent = `${field.stars} stars · ${field.analysed} analysed · ${field.accepted} accepted · ${field.rejected} rejected · ${field.awaiting} need a look`;
  }
  rows = stars.map((r) => ({ ...r, class: classCode(r.class) }));
  summary = flattenSummary(sum);
  bands = [...new Set(rows.flatMap((r) => Object.keys(r.mean_mag ?? {})))].sort(bandOrder);
  fillClassFilter();
  renderTable();
  renderSummary();
  renderPl();
  updateExportLinks();
}

/** The summary may carry its details under `detail`; distance follows from the modulus when not given. */
function flattenSummary(s) {
  if (!s) return null;
  // The detail is the full computation; its values win over the row's copies.
  const out = { ...s, ...(s.detail && typeof s.detail === 'object' ? s.detail : {}) };
  if (out.n_used === undefined) out.n_used = out.stars_used;
  if (out.distance_pc === undefined && Number.isFinite(out.mu)) {
    out.distance_pc = 10 ** (out.mu / 5 + 1);
    if (Number.isFinite(out.mu_err)) out.distance_pc_err = out.distance_pc * Math.LN10 / 5 * out.mu_err;
  }
  return out;
}

const BAND_ORDER = ['U', 'B', 'V', 'R', 'I', 'J', 'H', 'Ks', 'K', 'u', 'g', 'r', 'i', 'z'];
function bandOrder(a, b) {
  const ia = BAND_ORDER.indexOf(a); const ib = BAND_ORDER.indexOf(b);
  return (ia < 0 ? 99 : ia) - (ib < 0 ? 99 : ib) || a.localeCompare(b);
}

function fillClassFilter() {
  const sel = $('#filter-class');
  const classes = [...new Set(rows.map((r) => r.class ?? 'unknown'))].sort();
  replace(sel, el('option', { value: '', text: 'all' }), classes.map((c) => el('option', { value: c, text: CLASS_LABELS[c] ?? c })));
}

function updateExportLinks() {
  const acc = $('#export-accepted').checked;
  $('#export-csv').href = api.exportUrl(fieldId, 'csv', acc);
  $('#export-json').href = api.exportUrl(fieldId, 'json', acc);
  $('#export-votable').href = api.exportUrl(fieldId, 'votable', acc);
  $('#methods-text').href = `/api/v1/fields/${encodeURIComponent(fieldId)}/methods?accepted_only=${acc ? 'true' : 'false'}`;
}

// ---------- Table ----------
const COLUMNS = () => [
  { key: 'star', label: 'Star', value: (r) => r.star },
  { key: 'state', label: 'Review', value: (r) => (r.pending ? 'pending' : r.state) },
  { key: 'period_days', label: 'Period (d)', value: (r) => r.period_days, num: true },
  { key: 'class', label: 'Class', value: (r) => r.class ?? '' },
  ...bands.map((b) => ({ key: `mag_${b}`, label: `mean ${b}`, value: (r) => r.mean_mag?.[b] ?? null, num: true })),
  { key: 'distance_modulus', label: 'μ (mag)', value: (r) => r.distance_modulus, num: true },
  { key: 'distance_pc', label: 'Distance', value: (r) => r.distance_pc, num: true },
  { key: 'flags', label: 'Flags', value: (r) => (r.flags ?? []).length },
];

function filtered() {
  const q = $('#search').value.trim().toLowerCase();
  const st = $('#filter-state').value;
  const cls = $('#filter-class').value;
  return rows.filter((r) => {
    if (q && !r.star.toLowerCase().includes(q)) return false;
    if (st === 'pending' && !r.pending) return false;
    if (st === 'flagged' && !(r.flags ?? []).length) return false;
    if (st && st !== 'pending' && st !== 'flagged' && r.state !== st) return false;
    if (cls && (r.class ?? 'unknown') !== cls) return false;
    return true;
  });
}

function renderTable() {
  const cols = COLUMNS();
  const table = $('#stars-table');
  replace(table.tHead, el('tr', {}, cols.map((c) => el('th', {
    scope: 'col', class: c.num ? 'num' : '',
    'aria-sort': sort.key === c.key ? (sort.dir > 0 ? 'ascending' : 'descending') : 'none',
  }, el('button', {
    type: 'button', class: 'sort', text: c.label,
    on: { click: () => { sort.dir = sort.key === c.key ? -sort.dir : 1; sort.key = c.key; renderTable(); } },
  })))));
  const col = cols.find((c) => c.key === sort.key) ?? cols[0];
  const list = filtered().sort((a, b) => {
    const va = col.value(a); const vb = col.value(b);
    if (va === null || va === undefined) return 1;
    if (vb === null || vb === undefined) return -1;
    return (typeof va === 'number' ? va - vb : String(va).localeCompare(String(vb))) * sort.dir;
  });
  $('#stars-count').textContent = `${list.length} of ${rows.length} stars shown`;
  replace(table.tBodies[0], list.map((r) => el('tr', { class: 'clickable', dataset: { starId: r.star_id }, on: { click: (e) => { if (e.target.tagName !== 'A') location.href = `star.html?id=${r.star_id}`; } } },
    el('td', { class: 'nowrap' }, el('a', { href: `star.html?id=${r.star_id}`, text: r.star })),
    el('td', {}, stateChip(r)),
    el('td', { class: 'num', text: sig(r.period_days, 7) }),
    el('td', { class: 'nowrap', text: r.class ? (CLASS_SHORT[r.class] ?? r.class) : '–', title: r.class ? `${CLASS_LABELS[r.class] ?? r.class}${r.class_source ? ` (${r.class_source.replace('_', ' ')})` : ''}` : null }),
    bands.map((b) => el('td', { class: 'num', text: num(r.mean_mag?.[b] ?? null, 3) })),
    el('td', { class: 'num', text: pm(r.distance_modulus, r.distance_modulus_err, 2) }),
    el('td', { class: 'num', text: kpc(r.distance_pc, r.distance_pc_err) }),
    el('td', { class: 'flags' }, (r.flags ?? []).map((f) => el('span', { class: 'chip chip-flag', title: f, text: f.replaceAll('_', ' ') }))))));
}

export function stateChip(r) {
  if (r.pending) return el('span', { class: 'chip chip-pending', text: 'Re-analysing' });
  return el('span', { class: `chip chip-${r.state}`, text: STATE_LABELS[r.state] ?? r.state });
}

for (const id of ['#search', '#filter-state', '#filter-class']) $(id).addEventListener('input', renderTable);
$('#export-accepted').addEventListener('change', updateExportLinks);

// ---------- Summary ----------
function renderSummary() {
  const box = $('#summary');
  const s = summary;
  if (!s) {
    replace(box, el('p', { class: 'muted', text: 'No accepted star yet, so no field distance. Accept stars on their pages or in the review queue.' }));
    return;
  }
  if (s.failure_reason) {
    replace(box, el('p', { class: 'notice notice-warn', text: `No field distance: ${s.failure_reason.replaceAll('_', ' ')}` }));
    return;
  }
  const clipped = s.stars_rejected ?? s.n_clipped;
  // Error budget: the summary's own terms when it lists them, else its statistical / systematic split.
  const budget = s.error_budget ?? s.budget ?? (Number.isFinite(s.mu_err_stat) ? {
    statistical: s.mu_err_stat,
    systematic: s.mu_err_sys,
  } : null);
  replace(box,
    el('dl', { class: 'kv', id: 'summary-values' },
      el('dt', { text: 'Distance modulus' }), el('dd', { id: 'summary-mu', text: `${pm(s.mu, s.mu_err, 3)} mag` }),
      el('dt', { text: 'Distance' }), el('dd', { text: kpc(s.distance_pc, s.distance_pc_err) }),
      el('dt', { text: 'Stars used' }), el('dd', { id: 'summary-n', text: String(s.n_used ?? s.stars_used ?? '–') }),
      clipped !== undefined ? [el('dt', { text: 'Clipped as outliers' }), el('dd', { text: String(clipped) })] : null,
      s.relation_id ? [el('dt', { text: 'Relation' }), el('dd', { text: [s.relation_id, s.band].filter(Boolean).join(', ') })] : null,
      Number.isFinite(s.chi_square_red) ? [el('dt', { text: 'χ² per degree' }), el('dd', { text: num(s.chi_square_red, 2) })] : null,
      Number.isFinite(s.sigma_int_used) ? [el('dt', { text: 'Intrinsic scatter' }), el('dd', { text: `${num(s.sigma_int_used, 3)} mag${s.sigma_int_inflated ? ' (inflated)' : ''}` })] : null,
      Number.isFinite(s.slope_difference_sigma) ? [el('dt', { text: 'Free slope vs calibrated' }), el('dd', { text: `${num(s.slope_difference_sigma, 1)} σ` })] : null),
    budget ? budgetTable(budget, s.mu_err) : null,
    (s.flags ?? []).length ? el('p', {}, s.flags.map((f) => el('span', { class: 'chip chip-flag', text: f }))) : null);
}

// ---------- PL diagram ----------
/**
 * Points of the PL diagram. With the field summary's own points (accepted stars: log P against the
 * extinction-corrected magnitude) the other stars are placed from their own distance modulus on the same
 * relation: m0 = mu_star + (zero point - mu_field) + slope (log P - p0), metallicity term left out.
 */
function plPoints() {
  const pts = summary?.pl_points ?? summary?.pl?.points ?? summary?.points ?? null;
  if (Array.isArray(pts) && pts.length) {
    const byName = new Map(rows.map((r) => [r.star, r]));
    const points = pts.map((p) => ({
      x: p.log_p ?? p.log_period ?? (p.period_days ? Math.log10(p.period_days) : null),
      y: p.mag0 ?? p.mag ?? p.magnitude ?? null,
      state: p.kept === false ? 'clipped' : (p.state ?? byName.get(p.star)?.state ?? 'accepted'),
      star: p.star,
    })).filter((p) => p.x !== null && p.y !== null);
    const line = summary.fixed_slope_fit;
    if (line && Number.isFinite(summary.mu)) {
      const inSummary = new Set(points.map((p) => p.star));
      for (const r of rows) {
        if (inSummary.has(r.star) || !(r.period_days > 0) || !Number.isFinite(r.distance_modulus)) continue;
        if (summary.relation_id && r.relation_id && r.relation_id !== summary.relation_id) continue;
        const x = Math.log10(r.period_days);
        points.push({ x, y: r.distance_modulus + (line.zero_point - summary.mu) + line.slope * (x - line.p0), state: r.state, star: r.star });
      }
    }
    const band = summary.pl_band ?? summary.pl?.band ?? summary.band ?? '';
    return { band, corrected: true, points };
  }
  // Fall back to the table: the band most stars have a mean magnitude in.
  const counts = bands.map((b) => [b, rows.filter((r) => r.mean_mag?.[b] !== undefined && r.period_days).length]);
  counts.sort((a, b) => b[1] - a[1]);
  const band = counts[0]?.[0] ?? '';
  return {
    band,
    corrected: false,
    points: rows.filter((r) => r.period_days > 0 && r.mean_mag?.[band] !== undefined)
      .map((r) => ({ x: Math.log10(r.period_days), y: r.mean_mag[band], state: r.state, star: r.star })),
  };
}

function lineOf(fit, x0, x1, label, dash) {
  if (!fit || !Number.isFinite(fit.slope)) return null;
  const zp = fit.zero_point ?? fit.intercept;
  const p0 = fit.p0 ?? 0;
  if (!Number.isFinite(zp)) return null;
  return { label, colour: dash ? '#5b6573' : '#14232e', width: 2, dash, x: [x0, x1], y: [zp + fit.slope * (x0 - p0), zp + fit.slope * (x1 - p0)] };
}

function renderPl() {
  const { band, corrected, points } = plPoints();
  const box = $('#pl-chart');
  if (!points.length) { replace(box, el('p', { class: 'empty', text: 'No analysed star with a period yet.' })); return; }
  const pick = (st) => points.filter((p) => p.state === st);
  const clouds = [
    { label: 'accepted', colour: '#1e6b34', size: 7, pts: pick('accepted') },
    { label: 'accepted, clipped as outlier', colour: '#1e6b34', size: 7, hollow: true, pts: pick('clipped') },
    { label: 'rejected', colour: '#a3261b', size: 7, hollow: true, pts: pick('rejected') },
    { label: 'needs a look', colour: '#c77700', size: 7, pts: pick('awaiting') },
  ].filter((c) => c.pts.length).map((c) => ({ ...c, x: c.pts.map((p) => p.x), y: c.pts.map((p) => p.y) }));
  const xs = points.map((p) => p.x);
  const x0 = Math.min(...xs) - 0.05; const x1 = Math.max(...xs) + 0.05;
  const lines = [];
  const own = summary?.pl_fit ?? summary?.pl?.fit ?? summary?.fit ?? null;
  const fixed = lineOf(summary?.fixed_slope_fit ?? own, x0, x1, 'field fit (calibrated slope)', undefined);
  if (fixed) {
    lines.push(fixed);
    const free = lineOf(summary?.free_slope_fit, x0, x1, 'free-slope fit (diagnostic)', [6, 4]);
    if (free) lines.push(free);
  } else if (Array.isArray(own?.x) && Array.isArray(own?.y)) {
    lines.push({ label: 'fitted relation', colour: '#14232e', width: 2, x: own.x, y: own.y });
  } else {
    // The summary carries no line: draw the least-squares line through the accepted stars, and say so.
    const acc = pick('accepted');
    const line = leastSquares(acc.map((p) => p.x), acc.map((p) => p.y));
    if (line) {
      lines.push({ label: 'line through accepted stars (fitted in the browser)', colour: '#14232e', width: 2, dash: [6, 4],
        x: [x0, x1], y: [line.intercept + line.slope * x0, line.intercept + line.slope * x1] });
    }
  }
  const yLabel = corrected ? `${band || 'magnitude'}, extinction-corrected (mag)` : (band ? `mean ${band} (mag)` : 'mean magnitude');
  scatter(box, { xLabel: 'log₁₀ period (d)', yLabel, clouds, lines, invertY: true, height: 300, xRange: [x0, x1] });
  box.dataset.points = String(points.length);
}

function leastSquares(xs, ys) {
  const n = xs.length;
  if (n < 2) return null;
  const mx = xs.reduce((a, b) => a + b, 0) / n;
  const my = ys.reduce((a, b) => a + b, 0) / n;
  let sxx = 0; let sxy = 0;
  for (let i = 0; i < n; i++) { sxx += (xs[i] - mx) ** 2; sxy += (xs[i] - mx) * (ys[i] - my); }
  if (sxx <= 0) return null;
  const slope = sxy / sxx;
  return { slope, intercept: my - slope * mx };
}
