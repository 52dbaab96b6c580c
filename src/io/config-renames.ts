/**
 * The config version and what changed since version 1. Version 2 gave every concept one name
 * and every config kind the same blocks (docs/vocabulary.md). A version-1 config is refused,
 * not migrated: a silent migration would hide that `segmentLengths: {A, B}` with B ≠ 1 also
 * changes the length unit, and the user keeps one file format to read. The message lists the
 * exact renames the file needs, path by path.
 *
 * No zod here: every error message goes through version1Message (io/errors.ts), and the
 * commands that load little (--version, spinodal) must not load zod for it. The schema of the
 * `version` field is in schemas/config-version.ts.
 */

export const CONFIG_VERSION = 2;

export const CONFIG_KINDS = ['solve', 'train', 'invert', 'sweep', 'surrogate'] as const;

type Json = Record<string, unknown>;

function isObject(v: unknown): v is Json {
  return v !== null && typeof v === 'object' && !Array.isArray(v);
}

function at(root: unknown, path: string): unknown {
  let cur: unknown = root;
  for (const key of path.split('.')) {
    if (!isObject(cur)) return undefined;
    cur = cur[key];
  }
  return cur;
}

/** One rename: found at `from` in a version-1 file of these kinds, to be written as `to`. */
interface Rename {
  kinds: readonly string[];
  from: string;
  to: string;
  /** Extra advice when the value needs more than a new name. */
  note?: (value: unknown) => string | undefined;
}

const segmentNote = (value: unknown): string | undefined => {
  if (!isObject(value)) return undefined;
  const a = typeof value.A === 'number' ? value.A : 1;
  const b = typeof value.B === 'number' ? value.B : 1;
  const r = Number((a / b).toPrecision(6));
  return b === 1
    ? `here segmentRatio: ${r}`
    : `here segmentRatio: ${r}; lengths are now in Rg of a chain of segment length b_B, so a period or thickness in Rg changes by the factor ${Number(b.toPrecision(6))}`;
};

const SINGLE = ['solve', 'train', 'invert'] as const;
const RANGES = ['sweep', 'surrogate'] as const;

const RENAMES: Rename[] = [
  { kinds: SINGLE, from: 'system.chain.segmentLengths', to: 'system.chain.segmentRatio (b_A/b_B)', note: segmentNote },
  { kinds: ['train', 'sweep', 'surrogate'], from: 'reference', to: 'solver' },
  { kinds: RANGES, from: 'chain', to: 'system.chain' },
  { kinds: ['sweep'], from: 'grid', to: 'parameters' },
  { kinds: ['sweep'], from: 'grid.segmentLengthRatio', to: 'parameters.segmentRatio' },
  { kinds: ['surrogate'], from: 'parameters.segmentLengthRatio', to: 'parameters.segmentRatio' },
  { kinds: ['invert'], from: 'grid.nx', to: 'cell.nx' },
  { kinds: ['invert'], from: 'grid.ns', to: 'cell.ns' },
  { kinds: ['invert'], from: 'period', to: 'cell.period' },
  { kinds: ['invert'], from: 'network.steps', to: 'network.adamSteps' },
  { kinds: ['train'], from: 'training.steps', to: 'training.adamSteps' },
  { kinds: ['train'], from: 'warmStart.steps', to: 'warmStart.adamSteps' },
];

/** The renames a version-1 config needs, one line each, in file order of the table above. */
export function version1Renames(raw: unknown): string[] {
  const kind = isObject(raw) ? raw.kind : undefined;
  const lines = ['"version": 1 → "version": 2'];
  for (const r of RENAMES) {
    if (typeof kind !== 'string' || !r.kinds.includes(kind)) continue;
    const v = at(raw, r.from);
    if (v === undefined) continue;
    const note = r.note?.(v);
    lines.push(`${r.from} → ${r.to}${note ? ` (${note})` : ''}`);
  }
  if (at(raw, 'cell.period') === 'optimize') lines.push('cell.period "optimize" → "equilibrium"');
  return lines;
}

/** The message for a version-1 config, or undefined when `raw` is not one. */
export function version1Message(raw: unknown, source: string): string | undefined {
  if (!isObject(raw) || raw.version !== 1 || !(CONFIG_KINDS as readonly unknown[]).includes(raw.kind)) return undefined;
  const lines = version1Renames(raw);
  return [
    `${source}: a version-1 "${String(raw.kind)}" config; this version of mesofield reads version ${CONFIG_VERSION}, where every concept has one name (docs/vocabulary.md). Rename:`,
    ...lines.map((l) => `  ${l}`),
  ].join('\n');
}
