// Browsable API reference built from /openapi/v1.json. Every name and description from the document is placed as
// text (dom.js el/replace), never parsed as HTML.
import { el, replace, $ } from './dom.js';
import { deref, typeText, groups } from './apiref-model.js';

/** A schema as a nested list of properties, expanding references up to a small depth. */
function schemaView(doc, schema, depth = 0, seen = new Set()) {
  const [s, name] = deref(doc, schema);
  const head = el('code', { text: typeText(doc, schema) });
  if (depth > 2 || (name && seen.has(name))) return head;
  const next = new Set(seen);
  if (name) next.add(name);
  const target = s.type === 'array' || (Array.isArray(s.type) && s.type.includes('array')) ? deref(doc, s.items)[0] : s;
  const props = Object.entries(target?.properties ?? {});
  if (props.length === 0) return head;
  const required = new Set(target.required ?? []);
  return el('div', { class: 'schema' }, head, el('ul', {}, props.map(([prop, ps]) =>
    el('li', {}, el('code', { text: prop }), required.has(prop) ? ' (required) ' : ' ', schemaView(doc, ps, depth + 1, next)))));
}

function operationView(doc, path, method, op) {
  const params = [...(doc.paths[path].parameters ?? []), ...(op.parameters ?? [])].map((p) => deref(doc, p)[0]);
  const body = op.requestBody ? deref(doc, op.requestBody)[0] : null;
  const id = `op-${method}-${path}`.replace(/[^A-Za-z0-9_-]+/g, '-');
  return el('article', { class: 'card api-op', id, dataset: { method, path } },
    el('h3', {}, el('span', { class: `method method-${method}`, text: method.toUpperCase() }), ' ', el('code', { class: 'path', text: path })),
    op.summary ? el('p', { text: op.summary }) : null,
    op.description ? el('p', { class: 'muted', text: op.description }) : null,
    op.operationId ? el('p', { class: 'muted' }, 'operation id ', el('code', { text: op.operationId })) : null,
    params.length === 0 ? null : el('table', { class: 'api-params' },
      el('thead', {}, el('tr', {}, ['name', 'in', 'required', 'type'].map((h) => el('th', { text: h })))),
      el('tbody', {}, params.map((p) => el('tr', {},
        el('td', {}, el('code', { text: p.name })), el('td', { text: p.in }), el('td', { text: p.required ? 'yes' : 'no' }),
        el('td', {}, el('code', { text: typeText(doc, p.schema) })))))),
    body === null ? null : el('div', {}, el('h4', { text: 'Request body' }),
      el('ul', {}, Object.entries(body.content ?? {}).map(([media, c]) => el('li', {}, el('code', { text: media }), ' ', schemaView(doc, c.schema))))),
    el('h4', { text: 'Responses' }),
    el('ul', {}, Object.entries(op.responses ?? {}).map(([code, r0]) => {
      const r = deref(doc, r0)[0];
      const contents = Object.entries(r.content ?? {});
      return el('li', {}, el('strong', { text: code }), ' ', r.description ?? '',
        contents.length === 0 ? null : el('ul', {}, contents.map(([media, c]) => el('li', {}, el('code', { text: media }), ' ', schemaView(doc, c.schema)))));
    })));
}

async function main() {
  const resp = await fetch('/openapi/v1.json');
  if (!resp.ok) { replace($('#api-summary'), `Could not load the OpenAPI document (${resp.status}).`); return; }
  const doc = await resp.json();
  const grouped = groups(doc);
  const count = grouped.reduce((n, [, ops]) => n + ops.length, 0);
  replace($('#api-summary'), `${doc.info?.title ?? 'API'} ${doc.info?.version ?? ''}: ${count} operations in ${grouped.length} groups.`);
  replace($('#api-toc'), el('ul', { class: 'inline-list' }, grouped.map(([name, ops]) => el('li', {}, el('a', { href: `#group-${name}`, text: `${name} (${ops.length})` })))));
  replace($('#api-groups'), grouped.map(([name, ops]) => el('section', { class: 'api-group', id: `group-${name}` },
    el('h2', { text: name }), ops.map((o) => operationView(doc, o.path, o.method, o.op)))));
  $('#api-filter').addEventListener('input', (e) => {
    const q = e.target.value.trim().toLowerCase();
    for (const a of document.querySelectorAll('.api-op'))
      a.hidden = q !== '' && !a.textContent.toLowerCase().includes(q);
  });
}

main();
