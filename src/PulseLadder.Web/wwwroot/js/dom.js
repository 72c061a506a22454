// Small DOM helpers. Data from the API is only ever placed with textContent / attributes, never innerHTML.

/**
 * Creates an element. attrs: plain attributes, plus `class`, `text` (textContent), `on` ({event: handler}),
 * `dataset` and boolean properties (`disabled`, `checked`, `selected`, `hidden`).
 * Children may be nodes, strings (text nodes), arrays, null or undefined (skipped).
 */
export function el(tag, attrs = {}, ...children) {
  const node = document.createElement(tag);
  for (const [key, value] of Object.entries(attrs ?? {})) {
    if (value === null || value === undefined || value === false) continue;
    if (key === 'class') node.className = value;
    else if (key === 'text') node.textContent = String(value);
    else if (key === 'on') for (const [ev, fn] of Object.entries(value)) node.addEventListener(ev, fn);
    else if (key === 'dataset') Object.assign(node.dataset, value);
    else if (key === 'disabled' || key === 'checked' || key === 'selected' || key === 'hidden') node[key] = Boolean(value);
    else node.setAttribute(key, value === true ? '' : String(value));
  }
  append(node, children);
  return node;
}

function append(node, children) {
  for (const child of children) {
    if (child === null || child === undefined || child === false) continue;
    if (Array.isArray(child)) append(node, child);
    else if (child instanceof Node) node.appendChild(child);
    else node.appendChild(document.createTextNode(String(child)));
  }
}

/** Replaces all children of node. */
export function replace(node, ...children) {
  node.replaceChildren();
  append(node, children);
  return node;
}

export const $ = (sel, root = document) => root.querySelector(sel);

/** Formats a number with a fixed number of decimals; a dash for null/undefined/non-finite. */
export function num(value, digits = 3) {
  if (value === null || value === undefined || !Number.isFinite(value)) return '\u2013';
  return value.toFixed(digits);
}

/** Value with its uncertainty: "15.203 ± 0.012". */
export function pm(value, err, digits = 3) {
  if (value === null || value === undefined || !Number.isFinite(value)) return '\u2013';
  if (err === null || err === undefined || !Number.isFinite(err)) return num(value, digits);
  return `${num(value, digits)} \u00b1 ${num(err, digits)}`;
}

/** Significant-figure formatting for periods and false-alarm probabilities. */
export function sig(value, digits = 6) {
  if (value === null || value === undefined || !Number.isFinite(value)) return '\u2013';
  if (value !== 0 && (Math.abs(value) < 1e-3 || Math.abs(value) >= 1e6)) return value.toExponential(2);
  return Number(value.toPrecision(digits)).toString();
}

/** Distance in parsecs as kpc with its error. */
export function kpc(pc, err) {
  if (pc === null || pc === undefined || !Number.isFinite(pc)) return '\u2013';
  const e = err !== null && err !== undefined && Number.isFinite(err) ? ` \u00b1 ${(err / 1000).toFixed(2)}` : '';
  return `${(pc / 1000).toFixed(2)}${e} kpc`;
}

export function queryInt(name) {
  const v = new URLSearchParams(location.search).get(name);
  const n = v === null ? NaN : Number.parseInt(v, 10);
  return Number.isFinite(n) ? n : null;
}

/** Shows a transient status message in the page's live region (role=status). */
export function announce(message, kind = 'info') {
  let region = document.getElementById('toast');
  if (!region) {
    region = el('div', { id: 'toast', role: 'status', 'aria-live': 'polite' });
    document.body.appendChild(region);
  }
  const item = el('div', { class: `toast toast-${kind}`, text: message });
  region.appendChild(item);
  setTimeout(() => item.remove(), kind === 'error' ? 9000 : 4000);
}

export const sleep = (ms) => new Promise((r) => setTimeout(r, ms));
