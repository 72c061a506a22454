// Thin client of the PulseLadder HTTP API (docs/api.md). Every call returns parsed JSON or throws ApiError.

const BASE = '/api/v1';

export class ApiError extends Error {
  /** @param {number} status @param {object|null} problem ProblemDetails body when the server sent one */
  constructor(status, problem, fallback) {
    super(problem?.detail || problem?.title || fallback || `HTTP ${status}`);
    this.status = status;
    this.problem = problem;
    this.errors = Array.isArray(problem?.errors) ? problem.errors : [];
  }
}

async function parse(res) {
  if (res.status === 401) {
    // The session ended (expired, signed out elsewhere, account disabled): back to the sign-in page.
    location.assign(`/signin.html?return=${encodeURIComponent(location.pathname + location.search)}`);
  }
  if (res.status === 204) return null;
  const type = res.headers.get('content-type') || '';
  const body = type.includes('json') ? await res.json().catch(() => null) : null;
  if (!res.ok) throw new ApiError(res.status, body, `${res.status} ${res.statusText}`);
  return body;
}

// Antiforgery: every state-changing request sends the token in this header (docs/security.md). Fetched once per page.
let csrf = null;
async function csrfHeaders() {
  if (!csrf) {
    csrf = fetch(BASE + '/antiforgery', { headers: { accept: 'application/json' } }).then(parse)
      .then((t) => ({ [t.header_name]: t.token }))
      .catch((e) => { csrf = null; throw e; });
  }
  return csrf;
}

export async function get(path) {
  return parse(await fetch(BASE + path, { headers: { accept: 'application/json' } }));
}

async function send(method, path, body) {
  const headers = { accept: 'application/json', ...(await csrfHeaders()) };
  if (body !== undefined) headers['content-type'] = 'application/json';
  return parse(await fetch(BASE + path, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) }));
}

export const post = (path, body) => send('POST', path, body);
export const put = (path, body) => send('PUT', path, body);
export const del = (path) => send('DELETE', path);

export async function postForm(path, formData) {
  const headers = { accept: 'application/json', ...(await csrfHeaders()) };
  return parse(await fetch(BASE + path, { method: 'POST', body: formData, headers }));
}

export const api = {
  fields: () => get('/fields'),
  stars: (fieldId, params = {}) => {
    const q = new URLSearchParams({ page: '1', page_size: '500', ...params });
    return get(`/fields/${fieldId}/stars?${q}`);
  },
  summary: async (fieldId) => {
    try { return await get(`/fields/${fieldId}/summary`); } catch (e) { if (e.status === 404) return null; throw e; }
  },
  star: (starId) => get(`/stars/${starId}`),
  decide: (starId, decision) => post(`/stars/${starId}/decisions`, decision),
  next: (afterId) => get(afterId ? `/review/next?after=${afterId}` : '/review/next'),
  upload: (formData) => postForm('/uploads', formData),
  uploadStatus: (id) => get(`/uploads/${id}`),
  progress: () => get('/progress'),
  timeScales: () => get('/time-scales'),
  me: () => get('/me'),
  signOut: () => del('/session'),
  tokens: () => get('/tokens'),
  createToken: (name) => post('/tokens', { name }),
  revokeToken: (id) => del(`/tokens/${id}`),
  users: () => get('/users'),
  createUser: (user) => post('/users', user),
  updateUser: (name, change) => put(`/users/${encodeURIComponent(name)}`, change),
  userTokens: (name) => get(`/users/${encodeURIComponent(name)}/tokens`),
  revokeUserToken: (name, id) => del(`/users/${encodeURIComponent(name)}/tokens/${id}`),
  audit: (before) => get(before ? `/audit?limit=50&before=${before}` : '/audit?limit=50'),
  exportUrl: (fieldId, format, acceptedOnly) =>
    `${BASE}/fields/${fieldId}/export?format=${format}${acceptedOnly ? '&accepted_only=true' : ''}`,
};

/** Display names of our own for the review states and the class codes. */
export const STATE_LABELS = { awaiting: 'Needs a look', accepted: 'Accepted', rejected: 'Rejected' };

export const CLASS_LABELS = {
  unknown: 'Unknown',
  dcep_f: 'Classical Cepheid, fundamental',
  dcep_1o: 'Classical Cepheid, first overtone',
  t2cep: 'Type II Cepheid',
  rrab: 'RR Lyrae, fundamental (ab)',
  rrc: 'RR Lyrae, overtone (c)',
  other: 'Other variable',
  constant: 'Not variable',
};

/** Class codes from either our short codes or the enum names the analysis records carry. */
const CLASS_ENUM = {
  classical_cepheid_fundamental: 'dcep_f', classical_cepheid_first_overtone: 'dcep_1o', type_ii_cepheid: 't2cep',
  r_r_lyrae_a_b: 'rrab', rr_lyrae_ab: 'rrab', r_r_lyrae_c: 'rrc', rr_lyrae_c: 'rrc', other_variable: 'other', not_variable: 'constant',
};

export function classCode(value) {
  if (value === null || value === undefined || value === '') return null;
  const v = String(value).toLowerCase();
  return CLASS_LABELS[v] ? v : (CLASS_ENUM[v] ?? v);
}

/** Short class names for tables. */
export const CLASS_SHORT = {
  unknown: '?', dcep_f: 'Cepheid F', dcep_1o: 'Cepheid 1O', t2cep: 'Type II Cep', rrab: 'RR Lyr ab', rrc: 'RR Lyr c',
  other: 'other', constant: 'constant',
};

export const TIME_SCALES = [
  ['bjd_tdb', 'BJD (TDB)'], ['bmjd_tdb', 'BMJD (TDB)'], ['hjd_utc', 'HJD (UTC)'], ['hjd_tt', 'HJD (TT)'],
  ['jd_utc', 'JD (UTC)'], ['mjd_utc', 'MJD (UTC)'], ['jd_tt', 'JD (TT)'], ['mjd_tt', 'MJD (TT)'],
];
