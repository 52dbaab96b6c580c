/**
 * A run's config → compact settings rows for the report's appendix: one row per setting,
 * short arrays written out ("32, 32, 32"), long ones summarised with their range, numbers
 * without float noise.
 */
import type { SettingRow } from '../report-inputs.js';

function shortNumber(v: number): string {
  if (Number.isInteger(v) || v === 0) return String(v);
  const a = Math.abs(v);
  if (a < 1e-3 || a >= 1e6) return v.toExponential(3).replace(/\.?0+e/, 'e');
  return String(Number(v.toPrecision(6)));
}

function valueText(v: unknown): string {
  if (typeof v === 'number') return shortNumber(v);
  if (typeof v === 'string') return v;
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (Array.isArray(v)) {
    if (v.length === 0) return '(none)';
    if (v.every((e) => typeof e === 'number')) {
      const nums = v as number[];
      return nums.length <= 8 ? nums.map(shortNumber).join(', ') : `${nums.length} values from ${shortNumber(Math.min(...nums))} to ${shortNumber(Math.max(...nums))}`;
    }
    if (v.every((e) => typeof e === 'string' || typeof e === 'boolean')) return v.map(String).join(', ');
    return v.map((e) => JSON.stringify(e)).join('; ');
  }
  return JSON.stringify(v);
}

/** Flatten to "a.b.c" rows; `skip` drops whole branches (e.g. network settings of a classical-only run). */
export function settingRows(config: unknown, skip: (path: string) => boolean = () => false): SettingRow[] {
  const out: SettingRow[] = [];
  const walk = (v: unknown, path: string): void => {
    if (v === undefined || v === null || skip(path)) return;
    if (typeof v === 'object' && !Array.isArray(v)) {
      for (const [k, e] of Object.entries(v as Record<string, unknown>)) walk(e, path ? `${path}.${k}` : k);
      return;
    }
    out.push({ name: path, value: valueText(v) });
  };
  walk(config, '');
  return out;
}
