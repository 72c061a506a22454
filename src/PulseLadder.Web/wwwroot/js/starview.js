// The star view shared by star.html and review.html: light curves, periodogram, refolding in the browser,
// fits and residuals, cleaning, class, distance, decisions.
import { api, STATE_LABELS, CLASS_LABELS, CLASS_SHORT, classCode } from './api.js';
import { el, replace, num, pm, sig, kpc, announce, sleep } from './dom.js';
import { scatter, periodogram, setMarker, bandColour, shade } from './plots.js';
import { phaseOf, sampleFit, fourier, fitFourier, rms } from './fold.js';
import { budgetTable } from './budget.js';
import { whoAmI } from './shell.js';

/** Plain-language explanations of the cleaning and clipping reasons the pipeline records. */
const REASONS = {
  flagged: 'The upload marked this point as bad (non-empty flag column).',
  non_finite: 'Time, magnitude or error is not a finite number.',
  not_finite: 'Time, magnitude or error is not a finite number.',
  error_range: 'Its magnitude error is larger than the accepted maximum (or not positive).',
  mag_range: 'The magnitude lies outside the plausible range.',
  duplicate: 'Same time, band and observer as another point: only one is kept.',
  clipped: 'Too far from the fitted light curve (robust sigma clipping).',
  sigma_clip: 'Too far from the fitted light curve (robust sigma clipping).',
  outlier: 'Too far from the fitted light curve (robust sigma clipping).',
  time_range: 'The time lies outside the plausible range of dates.',
};

const ACTION_LABELS = {
  accept: 'Accepted', reject: 'Rejected', choose_period: 'Chose a period', set_class: 'Changed the class', note: 'Note', reopen: 'Reopened',
};

const PREVIEW_ORDER = 4;


/**
 * Renders star `starId` into `root`. Returns a controller: { ready (promise), accept(), reject(), usePeriod(),
 * foldAtFrequency(f), destroy() }. options.onDecided(action, result) runs after a decision was saved;
 * options.keyboard turns the A/R/P shortcuts on.
 */
export function mountStar(root, starId, options = {}) {
  const ctl = new StarView(root, starId, options);
  ctl.ready = ctl.load();
  return ctl;
}

class StarView {
  constructor(root, starId, options) {
    this.root = root;
    this.starId = starId;
    this.options = options;
    this.detail = null;
    this.fold = null; // { period, source }
    this.pgPlot = null;
    this.alive = true;
    this.onKey = (e) => this.key(e);
    if (options.keyboard) document.addEventListener('keydown', this.onKey);
  }

  destroy() {
    this.alive = false;
    document.removeEventListener('keydown', this.onKey);
    for (const c of this.root.querySelectorAll('.chart')) c._plot?.destroy();
    this.root.replaceChildren();
  }

  async load() {
    replace(this.root, el('p', { class: 'muted', text: 'Loading star…' }));
    try {
      this.detail = normalise(await api.star(this.starId));
    } catch (e) {
      if (this.alive) replace(this.root, el('p', { class: 'notice notice-bad', role: 'alert', text: `Could not load star ${this.starId}: ${e.message}` }));
      return;
    }
    // The review queue may have moved on while this star was loading: never draw into a view that was left.
    if (!this.alive) return;
    this.render();
    if (this.detail.star.pending) this.waitForAnalysis(this.detail.analysis?.revision ?? null);
  }

  key(e) {
    if (e.ctrlKey || e.metaKey || e.altKey) return;
    const t = e.target;
    if (t instanceof HTMLInputElement || t instanceof HTMLTextAreaElement || t instanceof HTMLSelectElement || t?.isContentEditable) return;
    const k = e.key.toLowerCase();
    if (k === 'a') { e.preventDefault(); this.accept(); }
    else if (k === 'r') { e.preventDefault(); this.reject(); }
    else if (k === 'p') { e.preventDefault(); this.usePeriod(); }
    else if (/^[1-9]$/.test(k)) {
      const peak = this.detail?.peaks?.[Number(k) - 1];
      if (peak) { e.preventDefault(); this.foldAtFrequency(peak.frequency, `peak ${k}`); }
    }
  }

  // ---------- rendering ----------
  render() {
    const d = this.detail;
    const s = d.star;
    const period = d.period?.period_days ?? s.period_days ?? (d.peaks?.[0]?.period_days ?? null);
    const source = d.period?.period_days || s.period_days ? 'pipeline' : 'strongest peak (the pipeline found no significant period)';
    this.fold = period ? { period, source } : null;
    for (const c of this.root.querySelectorAll('.chart')) c._plot?.destroy();

    const head = el('div', { class: 'card head' },
      el('div', { class: 'star-head' },
        el('h1', { id: 'star-name', text: s.star }),
        this.stateChip(s),
        el('span', { class: 'chip chip-flag', id: 'star-class', text: CLASS_LABELS[d.class?.class ?? s.class] ?? (d.class?.class ?? s.class ?? 'unclassified') }),
        el('span', { class: 'muted' }, 'field ', el('a', { href: this.fieldHref(), text: s.field ?? '' })),
        d.position ? el('span', { class: 'muted mono', text: `RA ${num(d.position.ra_deg, 5)}°  Dec ${num(d.position.dec_deg, 5)}°` }) : null,
        (s.flags ?? []).map((f) => el('span', { class: 'chip chip-flag', title: f, text: f.replaceAll('_', ' ') }))),
      this.actionsBar(),
      el('div', { id: 'pending-banner', class: 'banner', hidden: !s.pending, role: 'status', text: 'Being re-analysed through the queue… this view refreshes when the new analysis arrives.' }));

    const foldBar = el('div', { class: 'fold-bar', role: 'group', 'aria-label': 'Folding period' },
      el('span', {}, 'Folded at'),
      el('span', { class: 'period', id: 'fold-period', 'aria-live': 'polite' }),
      el('span', { class: 'muted', id: 'fold-source' }),
      el('label', { for: 'fold-input', class: 'toggle', text: 'Period (d)' }),
      el('input', { id: 'fold-input', type: 'number', step: 'any', min: '0', on: { keydown: (e) => { if (e.key === 'Enter') this.foldFromInput(); } } }),
      el('button', { type: 'button', on: { click: () => this.foldFromInput() } }, 'Fold'),
      el('button', { type: 'button', id: 'fold-reset', on: { click: () => this.foldAtPeriod(this.pipelinePeriod(), this.detail.period?.period_days ? 'pipeline' : 'strongest peak') } }, 'Back to pipeline period'));

    const pgCard = el('section', { class: 'card', 'aria-labelledby': 'pg-title' },
      el('div', { class: 'star-head' },
        el('h2', { id: 'pg-title', text: 'Periodogram' }),
        el('label', { class: 'toggle', for: 'window-toggle' },
          el('input', { id: 'window-toggle', type: 'checkbox', disabled: !d.window?.frequency?.length, on: { change: (e) => this.toggleWindow(e.target.checked) } }),
          'show spectral window')),
      el('p', { class: 'chart-help', text: 'Click any frequency to refold there at once (snaps to the highest power within a few pixels). Drag to zoom, double-click to reset. Triangles mark the top peaks.' }),
      el('div', { class: 'chart', id: 'pg-chart' }),
      this.peaksTable());

    const foldCard = el('section', { class: 'card', 'aria-labelledby': 'fold-title' },
      el('h2', { id: 'fold-title', text: 'Folded light curves' }),
      el('p', { class: 'chart-help', id: 'fold-help' }),
      el('div', { id: 'fold-charts', class: 'grid-2' }));

    const rawCard = el('section', { class: 'card', 'aria-labelledby': 'raw-title' },
      el('h2', { id: 'raw-title', text: 'Light curve by band and observer' }),
      el('p', { class: 'chart-help', text: 'As uploaded, on BJD (TDB). Hollow grey: points the pipeline set aside (see Cleaning). Drag to zoom, double-click to reset.' }),
      el('div', { id: 'raw-charts' }));

    const side = el('aside', {},
      this.classCard(), this.periodCard(), this.distanceCard(), this.cleaningCard(), this.offsetsCard(), this.historyCard());

    replace(this.root, head, foldBar, el('div', { class: 'grid-side' }, el('div', {}, foldCard, pgCard, rawCard), side));

    this.drawPeriodogram();
    this.drawRaw();
    if (this.fold) this.foldAtPeriod(this.fold.period, this.fold.source);
    else replace(this.root.querySelector('#fold-charts'), el('p', { class: 'empty', text: 'No period yet: click a frequency on the periodogram or type a period.' }));
  }

  fieldHref() {
    return `field.html?id=${this.detail.star.field_id ?? this.detail.field_id ?? ''}`;
  }

  stateChip(s) {
    if (s.pending) return el('span', { class: 'chip chip-pending', id: 'star-state', text: 'Re-analysing' });
    return el('span', { class: `chip chip-${s.state}`, id: 'star-state', text: STATE_LABELS[s.state] ?? s.state });
  }

  actionsBar() {
    const d = this.detail;
    const current = d.class?.class ?? d.star.class ?? 'unknown';
    // Decisions are recorded under the signed-in account (the server ignores any name the page might send).
    const deciding = el('span', { id: 'deciding-as', class: 'muted', text: '' });
    whoAmI.then((me) => {
      if (me.role === 'observer') {
        // Decisions need the reviewer role: the buttons would only meet 403.
        deciding.textContent = `Signed in as observer ${me.name}: decisions need a reviewer`;
        for (const b of bar.querySelectorAll('button')) b.disabled = true;
      } else deciding.textContent = `Deciding as ${me.name}`;
    }, () => {});
    const bar = el('div', { class: 'actions', style: 'margin-top:.45rem' },
      el('button', { type: 'button', class: 'good', id: 'btn-accept', on: { click: () => this.accept() } }, 'Accept ', el('kbd', { text: 'A' })),
      el('button', { type: 'button', class: 'bad', id: 'btn-reject', on: { click: () => this.reject() } }, 'Reject ', el('kbd', { text: 'R' })),
      el('button', { type: 'button', class: 'primary', id: 'btn-use-period', on: { click: () => this.usePeriod() } }, 'Use folded period ', el('kbd', { text: 'P' })),
      el('span', { style: 'display:inline-flex;gap:.35rem;align-items:center' },
        el('label', { for: 'class-select', class: 'toggle', text: 'Class' }),
        el('select', { id: 'class-select', style: 'width:auto' },
          Object.entries(CLASS_SHORT).map(([code, label]) => el('option', { value: code, text: code === 'unknown' ? 'unknown' : label, selected: code === current }))),
        el('button', { type: 'button', id: 'btn-set-class', on: { click: () => this.setClass() } }, 'Set class')),
      el('span', { style: 'display:inline-flex;gap:.35rem;align-items:center' },
        el('label', { for: 'note-input', class: 'toggle', text: 'Note' }),
        el('input', { id: 'note-input', type: 'text', style: 'width:12rem', placeholder: 'why, what to check…',
          on: { keydown: (e) => { if (e.key === 'Enter') this.addNote(); } } }),
        el('button', { type: 'button', id: 'btn-note', on: { click: () => this.addNote() } }, 'Add note')),
      el('span', { style: 'display:inline-flex;gap:.35rem;align-items:center;margin-left:auto' }, deciding));
    return bar;
  }

  peaksTable() {
    const peaks = this.detail.peaks ?? [];
    if (!peaks.length) return el('p', { class: 'muted', text: this.detail.analysis?.outcome ? `No peaks: ${this.detail.analysis.outcome}` : 'No peaks.' });
    return el('div', { class: 'table-wrap', style: 'margin-top:.5rem' }, el('table', { class: 'peaks', id: 'peaks-table' },
      el('caption', { class: 'muted', style: 'text-align:left', text: 'Top peaks — click a row (or press its number key) to refold' }),
      el('thead', {}, el('tr', {}, ['#', 'Period (d)', 'Frequency (1/d)', 'Power', 'False-alarm prob.', 'Relations'].map((h) => el('th', { scope: 'col', text: h })))),
      el('tbody', {}, peaks.map((p, i) => el('tr', {
        class: 'clickable', tabindex: '0', dataset: { frequency: p.frequency, rank: i + 1 },
        on: {
          click: () => this.foldAtFrequency(p.frequency, `peak ${i + 1}`),
          keydown: (e) => { if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); this.foldAtFrequency(p.frequency, `peak ${i + 1}`); } },
        },
      },
      el('td', { text: String(i + 1) }),
      el('td', { class: 'num', text: sig(p.period_days ?? 1 / p.frequency, 7) }),
      el('td', { class: 'num', text: sig(p.frequency, 6) }),
      el('td', { class: 'num', text: num(p.power, 3) }),
      el('td', { class: 'num', text: p.fap === null || p.fap === undefined ? '–' : sig(p.fap, 2), title: p.fap_method ?? null }),
      el('td', { text: (p.aliases ?? []).map((a) => aliasText(a, peaks)).join('; ') || '–', title: (p.aliases ?? []).join('; ') || null }))))));
  }

  classCard() {
    const c = this.detail.class;
    const src = { star_list: 'from the star list', reviewer: 'set by a reviewer', suggested: 'suggested by the pipeline' };
    return el('section', { class: 'card', 'aria-labelledby': 'class-title' },
      el('h2', { id: 'class-title', text: 'Class' }),
      c ? [
        el('p', {}, el('strong', { text: CLASS_LABELS[c.class] ?? c.class }), ' ',
          el('span', { class: 'muted', text: `${src[c.source] ?? c.source ?? ''}${c.confidence !== null && c.confidence !== undefined ? `, confidence ${num(c.confidence, 2)}` : ''}` })),
        (c.reasons ?? []).length ? el('ul', { class: 'reasons', id: 'class-reasons' }, c.reasons.map((r) => el('li', { text: r }))) : null,
      ] : el('p', { class: 'muted', text: 'Not classified yet.' }),
      this.detail.declared_class ? el('p', { class: 'muted', text: `Star list says: ${CLASS_LABELS[this.detail.declared_class] ?? this.detail.declared_class}` }) : null);
  }

  periodCard() {
    const p = this.detail.period;
    return el('section', { class: 'card', 'aria-labelledby': 'period-title' },
      el('h2', { id: 'period-title', text: 'Period' }),
      p ? el('dl', { class: 'kv' },
        el('dt', { text: 'Period' }), el('dd', { id: 'pipeline-period', text: `${sig(p.period_days, 8)} ± ${sig(p.period_err_days, 2)} d` }),
        el('dt', { text: 'How' }), el('dd', { text: p.method === 'reviewer' ? 'chosen by a reviewer, then refined' : (p.method ?? '–') }),
        el('dt', { text: 'PDM θ' }), el('dd', { text: num(p.pdm_theta, 3) }),
        p.pdm_preferred_period_days ? [el('dt', { text: 'PDM prefers' }), el('dd', { text: `${sig(p.pdm_preferred_period_days, 7)} d${p.pdm_disagrees ? ' — disagrees, worth a look' : ''}` })] : null)
        : el('p', { class: 'muted', text: this.detail.analysis?.outcome ? `No period: ${this.detail.analysis.outcome}` : 'No period yet.' }));
  }

  distanceCard() {
    const d = this.detail.distance;
    const box = el('section', { class: 'card', 'aria-labelledby': 'dist-title' }, el('h2', { id: 'dist-title', text: 'Distance' }));
    if (!d) { box.appendChild(el('p', { class: 'muted', text: 'No distance yet.' })); return box; }
    if (d.failure_reason) { box.appendChild(el('p', { class: 'notice notice-warn', text: `No distance: ${d.failure_reason.replaceAll('_', ' ')}` })); return box; }
    box.append(
      el('dl', { class: 'kv' },
        el('dt', { text: 'Modulus μ' }), el('dd', { id: 'star-mu', text: `${pm(d.mu, d.mu_err, 3)} mag` }),
        el('dt', { text: 'Distance' }), el('dd', { text: kpc(d.distance_pc, d.distance_pc_err) }),
        el('dt', { text: 'Relation' }), el('dd', { text: [d.relation_id, d.band].filter(Boolean).join(', ') || '–' }),
        el('dt', { text: 'E(B−V)' }), el('dd', { text: `${num(d.ebv, 3)}${d.ebv_source ? ` (${d.ebv_source.replaceAll('_', ' ')})` : ''}` })),
      budgetTable({ statistical: d.mu_err_stat, systematic: d.mu_err_sys, ...(d.error_budget ?? {}) }, d.mu_err));
    const routes = d.routes ?? [];
    if (routes.length) {
      box.appendChild(el('table', { class: 'routes', style: 'margin-top:.5rem', 'aria-label': 'Distance by route' },
        el('thead', {}, el('tr', {}, ['Route', 'M', 'm', 'A', 'μ'].map((h) => el('th', { scope: 'col', text: h })))),
        el('tbody', {}, routes.map((r) => el('tr', {},
          el('td', {}, el('strong', { text: r.band }), el('div', { class: 'muted small', text: r.relation_id })), el('td', { class: 'num', text: num(r.absolute_mag, 2) }),
          el('td', { class: 'num', text: num(r.apparent_mag, 2) }), el('td', { class: 'num', text: num(r.extinction, 2) }),
          el('td', { class: 'num', text: pm(r.mu, r.mu_err, 2) }))))));
    }
    for (const f of d.flags ?? []) box.appendChild(el('span', { class: 'chip chip-flag', title: f, text: f.replaceAll('_', ' ') }));
    return box;
  }

  cleaningCard() {
    const rej = this.detail.rejections ?? [];
    const box = el('section', { class: 'card', 'aria-labelledby': 'clean-title' },
      el('h2', { id: 'clean-title', text: `Cleaning (${rej.length} set aside)` }));
    if (!rej.length) { box.appendChild(el('p', { class: 'muted', text: 'Every observation was used.' })); return box; }
    const byReason = new Map();
    for (const r of rej) byReason.set(r.reason, (byReason.get(r.reason) ?? 0) + 1);
    box.appendChild(el('ul', { class: 'reasons', id: 'rejection-reasons' }, [...byReason].map(([reason, n]) =>
      el('li', {}, el('strong', { text: `${n} × ${reason.replaceAll('_', ' ')}` }), ` — ${REASONS[reason] ?? 'see the detail column'}`))));
    box.appendChild(el('div', { class: 'table-wrap', style: 'max-height:220px' }, el('table', { class: 'preview-table', 'aria-label': 'Points set aside' },
      el('thead', {}, el('tr', {}, ['Reason', 'Band', 'BJD', 'Mag'].map((h) => el('th', { scope: 'col', text: h })))),
      el('tbody', {}, rej.slice(0, 300).map((r) => [
        el('tr', { class: 'no-line' },
          el('td', { text: (r.reason ?? '').replaceAll('_', ' '), title: r.stage ? `stage: ${r.stage}` : null }), el('td', { text: r.band ?? '' }),
          el('td', { class: 'num', text: num(r.time, 3) }), el('td', { class: 'num', text: num(r.mag, 3) })),
        el('tr', {}, el('td', { colspan: '4', class: 'muted small', text: r.detail ?? '' })),
      ])))));
    return box;
  }

  offsetsCard() {
    const offs = this.detail.observer_offsets ?? [];
    if (!offs.length) return null;
    return el('section', { class: 'card', 'aria-labelledby': 'offs-title' },
      el('h2', { id: 'offs-title', text: 'Observer zero points' }),
      el('p', { class: 'chart-help', text: 'Offsets relative to each band\'s reference observer; the folded curves subtract them.' }),
      el('table', {}, el('thead', {}, el('tr', {}, ['Band', 'Observer', 'Offset (mag)'].map((h) => el('th', { scope: 'col', text: h })))),
        el('tbody', {}, offs.map((o) => el('tr', {}, el('td', { text: o.band }), el('td', { text: o.observer || '(none)' }), el('td', { class: 'num', text: pm(o.offset, o.error, 3) }))))));
  }

  historyCard() {
    const ds = this.detail.decisions ?? [];
    return el('section', { class: 'card', 'aria-labelledby': 'hist-title' },
      el('h2', { id: 'hist-title', text: 'Decision history' }),
      ds.length ? el('ol', { class: 'history', id: 'history' }, [...ds].reverse().map((x) => el('li', { dataset: { action: x.action } },
        el('strong', { text: ACTION_LABELS[x.action] ?? x.action }),
        x.period_days ? ` P = ${sig(x.period_days, 8)} d` : '',
        x.class ? ` → ${CLASS_LABELS[x.class] ?? x.class}` : '',
        x.note ? el('div', { text: x.note }) : null,
        el('div', { class: 'muted', text: `${x.decided_by ?? ''} · ${formatTime(x.decided_at)}` }))))
        : el('p', { class: 'muted', id: 'history', text: 'No decisions yet.' }));
  }

  // ---------- charts ----------
  pipelinePeriod() {
    return this.detail.period?.period_days ?? this.detail.star.period_days ?? this.detail.peaks?.[0]?.period_days ?? null;
  }

  drawPeriodogram() {
    const d = this.detail;
    const box = this.root.querySelector('#pg-chart');
    if (!d.periodogram?.frequency?.length) { replace(box, el('p', { class: 'empty', text: 'No periodogram stored for this analysis.' })); return; }
    const peaks = (d.peaks ?? []).map((p, i) => ({ frequency: p.frequency, power: p.power, label: String(i + 1) }));
    this.pgPlot = periodogram(box, {
      frequency: d.periodogram.frequency, power: d.periodogram.power, window: d.window, peaks,
      marker: this.fold ? 1 / this.fold.period : null,
      onPick: (f) => this.foldAtFrequency(f, 'clicked on the periodogram'),
    });
  }

  toggleWindow(show) {
    if (this.pgPlot && this.pgPlot.series.length > 2) this.pgPlot.setSeries(2, { show });
  }

  observations() {
    return this.detail.observations ?? [];
  }

  offsetOf(band, observer) {
    const o = (this.detail.observer_offsets ?? []).find((x) => x.band === band && x.observer === observer);
    return o ? o.offset : 0;
  }

  bands() {
    return [...new Set(this.observations().map((o) => o.band))];
  }

  drawRaw() {
    const box = this.root.querySelector('#raw-charts');
    const obs = this.observations();
    if (!obs.length) { replace(box, el('p', { class: 'empty', text: 'No observations.' })); return; }
    const t0 = Math.floor(Math.min(...obs.map((o) => o.bjd)) / 1000) * 1000;
    replace(box);
    this.bands().forEach((band, bi) => {
      const inBand = obs.filter((o) => o.band === band);
      const observers = [...new Set(inBand.map((o) => o.observer ?? ''))];
      const clouds = observers.map((who, oi) => {
        const pts = inBand.filter((o) => (o.observer ?? '') === who && o.used !== false);
        return { label: `${band} · ${who || 'no observer'} (${pts.length})`, colour: shade(bandColour(band, bi), oi), size: 4, x: pts.map((o) => o.bjd - t0), y: pts.map((o) => o.mag) };
      });
      const bad = inBand.filter((o) => o.used === false);
      if (bad.length) clouds.push({ label: `set aside (${bad.length})`, colour: '#6b7280', size: 6, hollow: true, x: bad.map((o) => o.bjd - t0), y: bad.map((o) => o.mag) });
      const chart = el('div', { class: 'chart', id: `raw-${band}`, role: 'img', 'aria-label': `Light curve in ${band}` });
      box.appendChild(chart);
      scatter(chart, { xLabel: `BJD − ${t0}`, yLabel: `${band} (mag)`, clouds, invertY: true, height: 190 });
    });
  }

  foldFromInput() {
    const v = Number.parseFloat(this.root.querySelector('#fold-input').value);
    if (Number.isFinite(v) && v > 0) this.foldAtPeriod(v, 'typed in');
    else announce('Type a period in days, e.g. 5.37', 'error');
  }

  foldAtFrequency(f, source) {
    if (Number.isFinite(f) && f > 0) this.foldAtPeriod(1 / f, source);
  }

  /** Refolds every band at `period` in the browser: no request, so it happens at once. */
  foldAtPeriod(period, source) {
    if (!(period > 0)) return;
    this.fold = { period, source };
    const d = this.detail;
    const label = this.root.querySelector('#fold-period');
    label.textContent = `P = ${sig(period, 8)} d  (f = ${sig(1 / period, 7)} d⁻¹)`;
    label.dataset.period = String(period);
    this.root.querySelector('#fold-source').textContent = `— ${source}`;
    this.root.querySelector('#fold-input').value = String(Number(period.toPrecision(9)));
    setMarker(this.pgPlot, 1 / period);
    for (const tr of this.root.querySelectorAll('#peaks-table tbody tr')) {
      const f = Number(tr.dataset.frequency);
      tr.classList.toggle('current', Math.abs(f * period - 1) < 1e-6);
    }

    const fits = d.fits ?? [];
    const box = this.root.querySelector('#fold-charts');
    for (const c of box.querySelectorAll('.chart')) c._plot?.destroy();
    replace(box);
    const obs = this.observations();
    let anyPreview = false;
    this.bands().forEach((band, bi) => {
      const used = obs.filter((o) => o.band === band && o.used !== false);
      const bad = obs.filter((o) => o.band === band && o.used === false);
      const stored = fits.find((f) => f.band === band);
      const sameP = stored && Math.abs(stored.period_days - period) / period < 1e-7;
      const t0 = stored?.phase_zero_bjd ?? (obs.length ? Math.min(...obs.map((o) => o.bjd)) : 0);
      const phases = used.map((o) => phaseOf(o.bjd, period, t0));
      const mags = used.map((o) => o.mag - this.offsetOf(band, o.observer ?? ''));
      let fit = sameP ? stored : fitFourier(phases, mags, used.map((o) => o.mag_err), Math.min(PREVIEW_ORDER, stored?.order ?? PREVIEW_ORDER));
      if (!sameP && fit) anyPreview = true;
      const colour = bandColour(band, bi);
      // Two cycles so that the curve's shape across phase 0 is visible.
      const twice = (a, add) => a.concat(a.map((v) => v + add));
      const clouds = [{ label: `${band} (${used.length})`, colour, size: 4, x: twice(phases, 1), y: mags.concat(mags) }];
      if (bad.length) {
        const bp = bad.map((o) => phaseOf(o.bjd, period, t0));
        const bm = bad.map((o) => o.mag);
        clouds.push({ label: 'set aside', colour: '#6b7280', size: 6, hollow: true, x: twice(bp, 1), y: bm.concat(bm) });
      }
      const lines = [];
      let resid = null;
      if (fit) {
        const [fx, fy] = sampleFit(fit, 200);
        lines.push({ label: sameP ? `pipeline fit (order ${stored.order})` : `browser preview fit (order ${fit.order})`, colour: '#14232e', width: 2,
          x: fx.concat(fx.slice(1).map((v) => v + 1)), y: fy.concat(fy.slice(1)) });
        resid = mags.map((m, i) => m - fourier(fit, phases[i]));
      }
      const card = el('div', { class: 'fold-band', dataset: { band } },
        el('h3', {}, `${band} band`, el('span', { class: 'muted', text: fit ? ` · mean ${sameP && stored.intensity_mean_mag ? num(stored.intensity_mean_mag, 3) : num(fit.a0, 3)} · residual rms ${num(rms(resid), 3)} mag` : '' })));
      const chart = el('div', { class: 'chart', id: `fold-${band}`, role: 'img', 'aria-label': `Light curve in ${band} folded at ${sig(period, 8)} days` });
      const rchart = el('div', { class: 'chart', id: `resid-${band}`, role: 'img', 'aria-label': `Residuals from the fit in ${band}` });
      card.append(chart, rchart);
      box.appendChild(card);
      scatter(chart, { xLabel: 'phase', yLabel: `${band} (mag)`, clouds, lines, invertY: true, height: 200, xRange: [0, 2] });
      chart.dataset.period = String(period);
      if (resid) {
        scatter(rchart, { xLabel: null, legend: false, yLabel: 'O − C', clouds: [{ label: 'residual', colour, size: 3, x: twice(phases, 1), y: resid.concat(resid) }],
          lines: [{ label: 'zero', colour: '#9aa3ad', width: 1, x: [0, 2], y: [0, 0] }], invertY: true, height: 100, xRange: [0, 2] });
      }
    });
    this.root.querySelector('#fold-help').textContent = anyPreview
      ? 'Folded in your browser at this period; the line is a quick preview fit made here. "Use folded period" sends it to the pipeline for a full analysis.'
      : 'Folded at the pipeline period; the line is the pipeline\'s Fourier fit, observer zero points applied.';
  }

  // ---------- decisions ----------
  async decide(body, doneText) {
    if (this.busy) return null;
    this.busy = true;
    try {
      const res = await api.decide(this.starId, body);
      announce(doneText, 'ok');
      return res;
    } catch (e) {
      announce(`Not saved: ${e.message}`, 'error');
      return null;
    } finally {
      this.busy = false;
    }
  }

  async accept() {
    const res = await this.decide({ action: 'accept' }, `${this.detail.star.star} accepted`);
    if (res) await this.afterDecision('accept', res);
  }

  async reject() {
    const res = await this.decide({ action: 'reject' }, `${this.detail.star.star} rejected`);
    if (res) await this.afterDecision('reject', res);
  }

  async usePeriod() {
    if (!this.fold) { announce('Fold at a period first.', 'error'); return; }
    const p = Number(this.fold.period.toPrecision(10));
    const res = await this.decide({ action: 'choose_period', period_days: p }, `Period ${sig(p, 8)} d sent for re-analysis`);
    if (res) await this.afterDecision('choose_period', res);
  }

  async setClass() {
    const cls = this.root.querySelector('#class-select').value;
    const res = await this.decide({ action: 'set_class', class: cls }, `Class set to ${CLASS_LABELS[cls] ?? cls}`);
    if (res) await this.afterDecision('set_class', res);
  }

  async addNote() {
    const input = this.root.querySelector('#note-input');
    const note = input.value.trim();
    if (!note) { input.focus(); return; }
    const res = await this.decide({ action: 'note', note }, 'Note saved');
    if (res) { input.value = ''; await this.afterDecision('note', res); }
  }

  async afterDecision(action, res) {
    const revision = this.detail.analysis?.revision ?? null;
    if (this.options.onDecided && (action === 'accept' || action === 'reject')) {
      this.options.onDecided(action, res);
      return;
    }
    if (res.queued) await this.waitForAnalysis(revision);
    else await this.refresh();
    this.options.onDecided?.(action, res);
  }

  /** Polls the star until a new analysis revision arrives (choose_period / set_class rerun through the queue). */
  async waitForAnalysis(oldRevision) {
    const banner = this.root.querySelector('#pending-banner');
    if (banner) banner.hidden = false;
    const stateChip = this.root.querySelector('#star-state');
    if (stateChip) { stateChip.className = 'chip chip-pending'; stateChip.textContent = 'Re-analysing'; }
    for (let i = 0; i < 600 && this.alive; i++) {
      await sleep(i < 10 ? 500 : 1000);
      let d;
      try { d = normalise(await api.star(this.starId)); } catch { continue; }
      if (!this.alive) return;
      if (!d.star.pending && (d.analysis?.revision ?? null) !== oldRevision) {
        this.detail = d;
        this.render();
        announce('New analysis arrived', 'ok');
        return;
      }
      if (!d.star.pending && i > 20) { this.detail = d; this.render(); return; }
    }
  }

  async refresh() {
    const d = normalise(await api.star(this.starId));
    if (!this.alive) return;
    this.detail = d;
    const keep = this.fold;
    this.render();
    if (keep && keep.source !== 'pipeline') this.foldAtPeriod(keep.period, keep.source);
  }
}

/**
 * Brings the star detail into one shape: the analysis may come flat (docs/api.md) or as the stored analysis record
 * under `result` (search.periodogram as {x, y}, class as an enum name).
 */
export function normalise(raw) {
  const r = raw.result ?? {};
  const search = r.search ?? null;
  const curve = (c) => (c ? { frequency: c.frequency ?? c.x ?? [], power: c.power ?? c.y ?? [] } : null);
  const cls = raw.class ?? r.class ?? null;
  const d = {
    ...raw,
    position: raw.position ?? (raw.star?.ra_deg !== undefined ? { ra_deg: raw.star.ra_deg, dec_deg: raw.star.dec_deg } : null),
    rejections: raw.rejections ?? r.rejections ?? [],
    periodogram: curve(raw.periodogram ?? search?.periodogram),
    window: curve(raw.window ?? search?.window),
    peaks: (raw.peaks ?? search?.peaks ?? []).map((p) => ({ ...p, period_days: p.period_days ?? 1 / p.frequency })),
    period: raw.period ?? r.period ?? null,
    fits: raw.fits ?? r.fits ?? [],
    observer_offsets: raw.observer_offsets ?? r.observer_offsets ?? [],
    class: cls ? { ...cls, class: classCode(cls.class) } : null,
    distance: raw.distance ?? r.distance ?? null,
    decisions: raw.decisions ?? [],
    outcome: raw.analysis?.outcome ?? r.outcome ?? null,
    search_failure: search?.failure_reason ?? null,
  };
  d.declared_class = classCode(raw.declared_class);
  if (d.star) d.star = { ...d.star, class: classCode(d.star.class) };
  return d;
}

const ALIAS_KINDS = {
  '1sd_alias': 'sidereal-day alias', '2sd_alias': 'half-sidereal-day alias', '1d_alias': 'one-day alias',
  '2d_alias': 'half-day alias', annual_alias: 'yearly alias', lunar_alias: 'monthly alias',
};

/** "1d_alias_of:0.18620" -> "one-day alias of #1" (the peak with that frequency), else a readable fallback. */
export function aliasText(code, peaks) {
  const m = /^(.+)_of:([-+0-9.eE]+)$/.exec(code);
  if (!m) return code.replaceAll('_', ' ');
  const f = Number(m[2]);
  const kind = ALIAS_KINDS[m[1]] ?? m[1].replaceAll('_', ' ');
  const idx = peaks.findIndex((p) => Math.abs(p.frequency - f) <= 1e-5 + 1e-6 * f);
  return idx >= 0 ? `${kind} of #${idx + 1}` : `${kind} of ${sig(f, 6)} d⁻¹`;
}

function formatTime(iso) {
  if (!iso) return '';
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? String(iso) : d.toISOString().replace('T', ' ').slice(0, 16) + ' UTC';
}
