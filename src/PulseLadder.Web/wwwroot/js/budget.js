// Error budget table shared by the field and star views.
import { el, num } from './dom.js';

/** Error budget given either as {term: value} or as [{term|name, value|sigma}]. Terms add in quadrature. */
export function budgetTable(budget, total) {
  if (!budget) return null;
  const entries = Array.isArray(budget)
    ? budget.map((b) => [b.term ?? b.name ?? b.source ?? '?', b.value ?? b.sigma ?? b.err ?? null])
    : Object.entries(budget).filter(([, v]) => typeof v === 'number' && Number.isFinite(v));
  if (!entries.length) return null;
  return el('table', { class: 'budget', 'aria-label': 'Error budget' },
    el('caption', { class: 'muted', style: 'text-align:left', text: 'Error budget (mag, 1σ; terms add in quadrature)' }),
    el('tbody', {}, entries.map(([k, v]) => el('tr', {}, el('th', { scope: 'row', text: k.replaceAll('_', ' ') }), el('td', { class: 'num', text: num(v, 3) }))),
      total !== undefined && total !== null ? el('tr', {}, el('th', { scope: 'row', text: 'total' }), el('td', { class: 'num', text: num(total, 3) })) : null));
}
