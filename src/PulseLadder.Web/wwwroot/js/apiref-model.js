// The OpenAPI document as the reference page shows it: no DOM here, so tests can run it under node.

export const METHODS = ['get', 'post', 'put', 'patch', 'delete', 'head', 'options'];

/** Resolves a local "#/components/schemas/X" reference; returns [schema, name|null]. */
export function deref(doc, schema) {
  if (schema && typeof schema.$ref === 'string' && schema.$ref.startsWith('#/')) {
    const path = schema.$ref.slice(2).split('/');
    let node = doc;
    for (const p of path) node = node?.[p];
    return [node ?? {}, path[path.length - 1]];
  }
  return [schema ?? {}, null];
}

/** A one-line type: "string", "integer (int64)", "array of StarRowDto", "A | null", "object". */
export function typeText(doc, schema) {
  if (!schema) return 'any';
  const [s, name] = deref(doc, schema);
  if (name) return name;
  if (Array.isArray(s.oneOf ?? s.anyOf)) return (s.oneOf ?? s.anyOf).map((x) => typeText(doc, x)).join(' | ');
  let type = Array.isArray(s.type) ? s.type.join(' | ') : s.type;
  if (type === 'array' || (Array.isArray(s.type) && s.type.includes('array'))) return `array of ${typeText(doc, s.items)}`;
  if (!type && s.properties) type = 'object';
  if (!type && s.additionalProperties) return `map of ${typeText(doc, s.additionalProperties)}`;
  if (s.enum) return `${type ?? 'value'}: ${s.enum.join(', ')}`;
  return (type ?? 'any') + (s.format ? ` (${s.format})` : '');
}

/**
 * Groups operations by tag. ASP.NET tags each endpoint with its declaring class ("FieldsApi" -> "Fields"); endpoints
 * tagged only with the application's name (inline handlers) are grouped by resource, the path segment after /api/v1.
 */
export function groups(doc) {
  const ops = [];
  for (const [path, item] of Object.entries(doc.paths ?? {}))
    for (const method of METHODS) if (item[method]) ops.push({ path, method, op: item[method] });
  const resource = (path) => { const m = /^\/api\/v\d+\/([^/]+)/.exec(path); return m ? m[1] : path.split('/')[1] || 'other'; };
  const key = (o) => { const tag = o.op.tags?.[0]; return tag && /^[A-Z]\w*Api$/.test(tag) ? tag.slice(0, -3) : resource(o.path); };
  const map = new Map();
  for (const o of ops.sort((a, b) => a.path.localeCompare(b.path) || METHODS.indexOf(a.method) - METHODS.indexOf(b.method))) {
    const k = key(o);
    if (!map.has(k)) map.set(k, []);
    map.get(k).push(o);
  }
  return [...map.entries()].sort((a, b) => a[0].localeCompare(b[0]));
}
