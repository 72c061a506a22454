// Client-side folding and Fourier curves, so a reviewer can refold at any period without a round trip.
// Phase convention matches the server's fits: phi = ((t - t0) / P) mod 1, in [0, 1).

/** Phase in cycles of time t (days) for period p (days) and zero point t0 (days). */
export function phaseOf(t, p, t0) {
  // Subtract t0 before dividing: BJD values near 2.46e6 would lose precision in t / p.
  const x = (t - t0) / p;
  return x - Math.floor(x);
}

/** Evaluates m(phi) = a0 + sum_k cos[k-1] cos(2 pi k phi) + sin[k-1] sin(2 pi k phi). */
export function fourier(fit, phi) {
  let m = fit.a0;
  const n = Math.min(fit.cos?.length ?? 0, fit.sin?.length ?? 0);
  for (let k = 1; k <= n; k++) {
    const a = 2 * Math.PI * k * phi;
    m += fit.cos[k - 1] * Math.cos(a) + fit.sin[k - 1] * Math.sin(a);
  }
  return m;
}

/** Samples the fitted curve on n+1 phases from 0 to 1 inclusive. */
export function sampleFit(fit, n = 200) {
  const xs = new Array(n + 1);
  const ys = new Array(n + 1);
  for (let i = 0; i <= n; i++) { xs[i] = i / n; ys[i] = fourier(fit, xs[i]); }
  return [xs, ys];
}

/**
 * Weighted least-squares Fourier fit of the given order to (phase, mag, err) in the browser: a preview when the
 * reviewer folds at a period the pipeline has not fitted. Returns null when there are too few points.
 */
export function fitFourier(phases, mags, errs, order) {
  const n = phases.length;
  const k = Math.max(1, Math.min(order, Math.floor((n - 1) / 2) - 1));
  const m = 2 * k + 1;
  if (n < m + 2) return null;
  const ata = Array.from({ length: m }, () => new Float64Array(m));
  const atb = new Float64Array(m);
  const row = new Float64Array(m);
  for (let i = 0; i < n; i++) {
    const w = errs && errs[i] > 0 ? 1 / (errs[i] * errs[i]) : 1;
    row[0] = 1;
    for (let j = 1; j <= k; j++) {
      const a = 2 * Math.PI * j * phases[i];
      row[2 * j - 1] = Math.cos(a);
      row[2 * j] = Math.sin(a);
    }
    for (let r = 0; r < m; r++) {
      atb[r] += w * row[r] * mags[i];
      for (let c = r; c < m; c++) ata[r][c] += w * row[r] * row[c];
    }
  }
  for (let r = 0; r < m; r++) for (let c = 0; c < r; c++) ata[r][c] = ata[c][r];
  const x = solve(ata, atb);
  if (!x) return null;
  const fit = { a0: x[0], cos: [], sin: [], order: k };
  for (let j = 1; j <= k; j++) { fit.cos.push(x[2 * j - 1]); fit.sin.push(x[2 * j]); }
  return fit;
}

// Gaussian elimination with partial pivoting; null when singular (e.g. all phases in one clump).
function solve(a, b) {
  const m = b.length;
  const A = a.map((r) => Float64Array.from(r));
  const B = Float64Array.from(b);
  for (let col = 0; col < m; col++) {
    let piv = col;
    for (let r = col + 1; r < m; r++) if (Math.abs(A[r][col]) > Math.abs(A[piv][col])) piv = r;
    if (Math.abs(A[piv][col]) < 1e-12) return null;
    [A[col], A[piv]] = [A[piv], A[col]];
    [B[col], B[piv]] = [B[piv], B[col]];
    for (let r = col + 1; r < m; r++) {
      const f = A[r][col] / A[col][col];
      if (f === 0) continue;
      for (let c = col; c < m; c++) A[r][c] -= f * A[col][c];
      B[r] -= f * B[col];
    }
  }
  const x = new Float64Array(m);
  for (let r = m - 1; r >= 0; r--) {
    let s = B[r];
    for (let c = r + 1; c < m; c++) s -= A[r][c] * x[c];
    x[r] = s / A[r][r];
  }
  return Array.from(x);
}

/** Root-mean-square of an array (null when empty). */
export function rms(values) {
  if (!values.length) return null;
  let s = 0;
  for (const v of values) s += v * v;
  return Math.sqrt(s / values.length);
}
