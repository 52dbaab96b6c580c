/** Flag parsers shared by the film commands (no solver code, so a command table loads them cheaply). */
import { InputError } from '../../io/errors.js';

/** A comma-separated list of exactly `count` numbers, named after its flag in errors. */
export function numberList(flag: string, value: string | undefined, count: number, example: string): number[] | undefined {
  if (value === undefined) return undefined;
  const parts = value.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.length !== count || parts.some((p) => p === '') || nums.some((v) => !Number.isFinite(v))) {
    throw new InputError(`${flag}: got ${JSON.stringify(value)}; allowed: ${count} comma-separated numbers (e.g. ${example})`);
  }
  return nums;
}

export function sldFlag(value: string | undefined) {
  const v = numberList('--sld', value, 4, '6.0,1.0,2.07,0 for A, B, substrate, medium in 10⁻⁶ Å⁻²');
  return v && { A: v[0], B: v[1], substrate: v[2], medium: v[3] };
}
