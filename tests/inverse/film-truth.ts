/** The synthetic film both film-fit test files recover: a symmetric diblock between two walls. */
export const chain = { type: 'diblock' as const, f: 0.5, segmentRatio: 1 };
export const truth = { chiN: 16, bottom: 1.0, top: -0.6, thickness: 5, width: 0.25, offset: 0.3 };

export function inside(v: number, iv: { lo: number; hi: number }) {
  return v >= iv.lo && v <= iv.hi;
}
