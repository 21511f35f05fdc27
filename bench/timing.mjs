// Timing helpers for the benchmarks: medians of repeated batches after a warm-up.
import { spawnSync } from 'node:child_process';

export function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/**
 * Median time per call of fn, in milliseconds. fn runs for at least warmupMs (and warmupCalls
 * calls) first; then the calls per batch are chosen so that one batch lasts about batchMs, and
 * `batches` batches are timed. Returns { ms, samples, perBatch, last } with last = fn's last value.
 */
export function measure(fn, { warmupMs = 300, warmupCalls = 3, batchMs = 100, batches = 7 } = {}) {
  let last;
  let calls = 0;
  const t0 = performance.now();
  while (calls < warmupCalls || performance.now() - t0 < warmupMs) {
    last = fn();
    calls++;
  }
  // Calibrate after the warm-up (the first calls may include one-time set-up).
  let perBatch = 1;
  if (batchMs > 0) {
    for (;;) {
      const s = performance.now();
      for (let k = 0; k < perBatch; k++) last = fn();
      const t = performance.now() - s;
      if (t >= batchMs / 4) {
        perBatch = Math.max(1, Math.round((perBatch * batchMs) / t));
        break;
      }
      perBatch *= 4;
    }
  }
  const samples = [];
  for (let b = 0; b < batches; b++) {
    const s = performance.now();
    for (let k = 0; k < perBatch; k++) last = fn();
    samples.push((performance.now() - s) / perBatch);
  }
  return { ms: median(samples), samples, perBatch, last };
}

/** Median wall time (ms) of a whole process, spawned `runs` times after `warmup` unrecorded runs. */
export function processTime(cmd, args, { runs = 11, warmup = 2, cwd } = {}) {
  const samples = [];
  let status = 0;
  for (let k = 0; k < warmup + runs; k++) {
    const s = performance.now();
    const r = spawnSync(cmd, args, { cwd, stdio: ['ignore', 'ignore', 'pipe'] });
    const t = performance.now() - s;
    status = r.status ?? -1;
    if (k >= warmup) samples.push(t);
  }
  return { ms: median(samples), samples, status };
}

/**
 * Two functions timed in interleaved batches (a, b, a, b...), each batch sized by its own
 * warm-up, so that the load of a shared machine falls on both alike. Returns each one's median
 * time per call (ms) and last value, and the median of the per-batch ratios b / a.
 */
export function interleaved(fa, fb, { warmupMs = 300, batchMs = 100, batches = 7 } = {}) {
  const wa = measure(fa, { warmupMs, batchMs, batches: 1 });
  const wb = measure(fb, { warmupMs, batchMs, batches: 1 });
  const ta = [];
  const tb = [];
  const ratios = [];
  for (let k = 0; k < batches; k++) {
    let s = performance.now();
    for (let q = 0; q < wa.perBatch; q++) fa();
    const a = (performance.now() - s) / wa.perBatch;
    s = performance.now();
    for (let q = 0; q < wb.perBatch; q++) fb();
    const b = (performance.now() - s) / wb.perBatch;
    ta.push(a);
    tb.push(b);
    ratios.push(b / a);
  }
  return { a: { ms: median(ta), last: wa.last }, b: { ms: median(tb), last: wb.last }, ratio: median(ratios) };
}

/** Least-squares slope of y against x. */
export function linearSlope(xs, ys) {
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let num = 0;
  let den = 0;
  for (let k = 0; k < xs.length; k++) {
    num += (xs[k] - mx) * (ys[k] - my);
    den += (xs[k] - mx) ** 2;
  }
  return num / den;
}

/** Least-squares slope of log(y) against log(x). */
export function logLogSlope(xs, ys) {
  return linearSlope(xs.map(Math.log), ys.map(Math.log));
}

/** A number for a table: 3 significant digits, exponent form outside 1e-3..1e6. */
export function fmt(x, digits = 3) {
  if (x === undefined || x === null || Number.isNaN(x)) return '-';
  if (!Number.isFinite(x)) return String(x);
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-3 || a >= 1e7)) return x.toExponential(digits - 1);
  return String(Number(x.toPrecision(digits)));
}

/** Plain-text table with right-aligned columns except the first. */
export function table(headers, rows) {
  const cells = [headers, ...rows].map((r) => r.map((c) => String(c)));
  const widths = headers.map((_, j) => Math.max(...cells.map((r) => (r[j] ?? '').length)));
  const line = (r) => r.map((c, j) => (j === 0 ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ');
  return [line(cells[0]), widths.map((w) => '-'.repeat(w)).join('  '), ...cells.slice(1).map(line)].join('\n');
}
