/** Axis ticks at 1, 2 or 5 × 10^k steps (common practice, no source) and short number labels. */

export function niceTicks(min: number, max: number, target = 5): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (max <= min) return [min];
  const raw = (max - min) / Math.max(1, target);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let v = Math.ceil(min / step - 1e-9) * step; v <= max + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

/** Compact label: fixed notation for ordinary magnitudes, exponent form for tiny or huge ones. */
export function formatTick(v: number, ticks: number[]): string {
  if (v === 0) return '0';
  const span = Math.max(...ticks.map(Math.abs));
  if (span < 1e-3 || span >= 1e5) return v.toExponential(1).replace('e+', 'e');
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : Math.abs(v);
  const decimals = Math.max(0, Math.min(6, -Math.floor(Math.log10(step) + 1e-9)));
  return v.toFixed(decimals);
}

/**
 * Log-axis ticks: the decades in [min, max]; when fewer than two fall inside, 1-2-5 or
 * all nine mantissas per decade, so a narrow range still gets two labelled ticks.
 */
export function logTicks(min: number, max: number): number[] {
  if (!(min > 0) || !(max > min)) return min > 0 ? [min] : [];
  const lo = Math.floor(Math.log10(min));
  const hi = Math.ceil(Math.log10(max));
  for (const mantissas of [[1], [1, 2, 5], [1, 2, 3, 4, 5, 6, 7, 8, 9]]) {
    const out: number[] = [];
    for (let k = lo; k <= hi; k++) for (const m of mantissas) {
      const v = Number((m * 10 ** k).toPrecision(12));
      if (v >= min * (1 - 1e-12) && v <= max * (1 + 1e-12)) out.push(v);
    }
    if (out.length >= 2) return out;
  }
  return [min, max];
}

/** "1e-3", "5e-4": short labels for log ticks. */
export function formatLogTick(v: number): string {
  const k = Math.floor(Math.log10(v) + 1e-9);
  const m = Math.round(v / 10 ** k);
  return m === 1 ? `1e${k}` : `${m}e${k}`;
}
