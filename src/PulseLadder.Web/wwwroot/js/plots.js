// uPlot wrappers for the review pages: point clouds (light curves, PL diagram) and the periodogram.
import uPlot from '/lib/uplot/uPlot.esm.js';

export { uPlot };

const AXIS = { stroke: '#273043', grid: { stroke: '#e3e6ea', width: 1 }, ticks: { stroke: '#c9ced6', width: 1 } };

/** Band colours of our own: distinct hues, all at least 4.5:1 on the white chart background. */
const BAND_COLOURS = {
  U: '#6a3d9a', B: '#2f4fb3', V: '#0f7a4a', R: '#b3421f', I: '#8c1d40',
  J: '#7a5c00', H: '#5c4a2e', Ks: '#3d3d3d', K: '#3d3d3d',
  u: '#6a3d9a', g: '#0f7a4a', r: '#b3421f', i: '#8c1d40', z: '#4a4a4a',
};
const EXTRA = ['#0b6e8a', '#9a4d00', '#5e2b97', '#2d6a2d', '#a3195b', '#395b64'];

export function bandColour(band, index = 0) {
  return BAND_COLOURS[band] ?? EXTRA[index % EXTRA.length];
}

/** A lighter or darker variant of a hex colour for the n-th observer within a band. */
export function shade(hex, n) {
  if (n === 0) return hex;
  const f = [0, 0.35, -0.3, 0.55, -0.45][n % 5];
  const c = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
  const out = c.map((v) => Math.round(f > 0 ? v + (255 - v) * f : v * (1 + f)));
  return '#' + out.map((v) => v.toString(16).padStart(2, '0')).join('');
}

function sortedPairs(xs, ys) {
  const idx = xs.map((_, i) => i).sort((a, b) => xs[a] - xs[b]);
  return [idx.map((i) => xs[i]), idx.map((i) => ys[i])];
}

function widthOf(container) {
  return Math.max(320, Math.floor(container.clientWidth || container.parentElement?.clientWidth || 600));
}

function keepSized(u, container, height) {
  if (!('ResizeObserver' in window)) return;
  let last = widthOf(container);
  const ro = new ResizeObserver(() => {
    const w = widthOf(container);
    if (Math.abs(w - last) > 2) { last = w; u.setSize({ width: w, height }); }
  });
  ro.observe(container);
  u._resizeObserver = ro;
}

/** Destroys the chart previously drawn into container, if any. */
export function clear(container) {
  const old = container._plot;
  if (old) { old._resizeObserver?.disconnect(); old.destroy(); container._plot = null; }
}

/**
 * Scatter chart. clouds: [{label, x, y, colour, size, hollow}] drawn as points; lines: [{label, x, y, colour,
 * width, dash}] drawn as lines. invertY for magnitudes (brighter is up). Drag to zoom, double-click to reset.
 */
export function scatter(container, { xLabel, yLabel, clouds = [], lines = [], invertY = false, height = 260,
  xRange = null, title = null, legend = true }) {
  clear(container);
  const tables = [];
  const series = [{ label: xLabel ?? 'x' }];
  for (const c of clouds) {
    tables.push(sortedPairs(c.x, c.y));
    const size = c.size ?? 5;
    series.push({
      label: c.label,
      stroke: c.colour,
      fill: c.colour,
      paths: () => null,
      points: { show: true, size, width: c.hollow ? 1.5 : 1, stroke: c.colour, fill: c.hollow ? '#ffffff' : c.colour, space: 0 },
    });
  }
  for (const l of lines) {
    tables.push(sortedPairs(l.x, l.y));
    series.push({ label: l.label, stroke: l.colour, width: l.width ?? 2, dash: l.dash, spanGaps: true, points: { show: false } });
  }
  const data = tables.length ? uPlot.join(tables) : [[], []];
  if (!tables.length) series.push({ label: 'none' });
  const opts = {
    title: title ?? undefined,
    width: widthOf(container),
    height,
    legend: { show: legend, live: false },
    cursor: { drag: { x: true, y: true, uni: 30 }, points: { show: false } },
    scales: {
      x: { time: false, ...(xRange ? { range: xRange } : {}) },
      y: { dir: invertY ? -1 : 1 },
    },
    axes: [
      { ...AXIS, label: xLabel ?? undefined, labelSize: xLabel ? 20 : 0 },
      { ...AXIS, label: yLabel, labelSize: 20, size: 56 },
    ],
    series,
  };
  const u = new uPlot(opts, data, container);
  container._plot = u;
  keepSized(u, container, height);
  return u;
}

/**
 * Periodogram with the spectral window as a second, hidden-by-default series. peaks: [{frequency, label}] are
 * marked with numbered ticks; `marker` (a frequency) is the fold currently shown. onPick(frequency) is called on
 * a click (not a drag), snapped to the highest power within a few pixels.
 */
export function periodogram(container, { frequency, power, window: win, peaks = [], marker = null, onPick, height = 240 }) {
  clear(container);
  const tables = [[frequency, power]];
  const hasWindow = Boolean(win && win.frequency?.length);
  if (hasWindow) tables.push([win.frequency, win.power]);
  const data = uPlot.join(tables);
  const state = { marker, peaks };
  const series = [
    { label: 'frequency (1/d)' },
    { label: 'power', stroke: '#1d3f72', width: 1.25, points: { show: false } },
  ];
  if (hasWindow) series.push({ label: 'spectral window', stroke: '#b25d00', width: 1, dash: [4, 3], show: false, spanGaps: true, points: { show: false } });
  const opts = {
    width: widthOf(container),
    height,
    legend: { show: true, live: true },
    cursor: { drag: { x: true, y: false }, points: { show: false } },
    scales: { x: { time: false }, y: { range: (u, min, max) => [0, Math.max(max, 1e-9) * 1.22] } },
    axes: [
      { ...AXIS, label: 'frequency (cycles per day)', labelSize: 20 },
      { ...AXIS, label: 'power', labelSize: 20, size: 56 },
    ],
    series,
    hooks: {
      draw: [(u) => drawPeakMarks(u, state)],
    },
  };
  const u = new uPlot(opts, data, container);
  container._plot = u;
  u._state = state;
  keepSized(u, container, height);

  let downX = null;
  u.over.addEventListener('mousedown', (e) => { downX = e.clientX; });
  u.over.addEventListener('click', (e) => {
    if (downX !== null && Math.abs(e.clientX - downX) > 3) return; // that was a zoom drag
    const left = u.cursor.left;
    if (left === null || left < 0) return;
    onPick?.(snapToPeak(u, left));
  });
  return u;
}

/** Moves the fold marker without redrawing the data. */
export function setMarker(u, frequency) {
  if (!u) return;
  u._state.marker = frequency;
  u.redraw(false);
}

function snapToPeak(u, left) {
  const xs = u.data[0];
  const ys = u.data[1];
  const lo = u.posToVal(left - 4, 'x');
  const hi = u.posToVal(left + 4, 'x');
  let best = null;
  let bestPow = -Infinity;
  for (let i = 0; i < xs.length; i++) {
    if (xs[i] < lo || xs[i] > hi || ys[i] === null) continue;
    if (ys[i] > bestPow) { bestPow = ys[i]; best = xs[i]; }
  }
  return best ?? u.posToVal(left, 'x');
}

function drawPeakMarks(u, state) {
  const ctx = u.ctx;
  const { top, height } = u.bbox;
  const px = devicePixelRatio || 1;
  ctx.save();
  ctx.font = `${11 * px}px system-ui, sans-serif`;
  ctx.textAlign = 'center';
  state.peaks.forEach((p, i) => {
    const x = u.valToPos(p.frequency, 'x', true);
    if (x < u.bbox.left || x > u.bbox.left + u.bbox.width) return;
    const y = u.valToPos(p.power, 'y', true);
    ctx.fillStyle = i === 0 ? '#8c1d40' : '#1d3f72';
    ctx.beginPath();
    ctx.moveTo(x, y - 4 * px);
    ctx.lineTo(x - 5 * px, y - 12 * px);
    ctx.lineTo(x + 5 * px, y - 12 * px);
    ctx.closePath();
    ctx.fill();
    ctx.fillText(p.label, x, y - 15 * px);
  });
  if (state.marker !== null && state.marker !== undefined) {
    const x = u.valToPos(state.marker, 'x', true);
    ctx.strokeStyle = '#0b6e69';
    ctx.lineWidth = 2 * px;
    ctx.setLineDash([6 * px, 4 * px]);
    ctx.beginPath();
    ctx.moveTo(x, top);
    ctx.lineTo(x, top + height);
    ctx.stroke();
  }
  ctx.restore();
}
