/**
 * A config assembled from a file and flags, validated by the config kind's zod schema, with
 * every message naming what the user actually typed: the flag (`--chiN → system.chiN: …`)
 * when a flag set the value, the file and key (`run.json: cell.period: …`) when the file did,
 * and "(default)" when neither did. Which flag sets which config key is FLAG_CONFIG_PATHS,
 * the one table of it (a renamed config key is one edit there).
 */
import { dirname, isAbsolute, resolve } from 'node:path';
import type { z } from 'zod';
import { InputError, describeValue, issueMessage } from '../io/errors.js';
import { version1Message } from '../io/config-renames.js';
import { readRawConfig } from './raw-config.js';
import { parseDecimal } from './decimal-text.js';

/** Flag → config path, per command. */
export const FLAG_CONFIG_PATHS = {
  solve: {
    '--chain': 'system.chain.type',
    '--f': 'system.chain.f',
    '--segment-ratio': 'system.chain.segmentRatio',
    '--first-block-share': 'system.chain.firstBlockShare',
    '--chiN': 'system.chiN',
    '--period': 'cell.period',
    '--periods': 'cell.periods',
    '--nx': 'cell.nx',
    '--ns': 'cell.ns',
    '--tolerance': 'solver.tolerance',
    '--start': 'solver.start',
    '--propagators': 'output.propagators',
    '--film': 'cell.thickness',
    '--affinity': 'cell.walls',
  },
  invert: {
    '--f': 'system.chain.f',
    '--method': 'method',
    '--period': 'cell.period',
    '--chiN-range': 'chiNRange',
    '--resolution': 'resolution',
    '--nx': 'cell.nx',
    '--ns': 'cell.ns',
    '--profile-points': 'profilePoints',
    '--seeds': 'network.seeds',
    '--strategy': 'network.strategy',
    '--adam-steps': 'network.adamSteps',
    '--lbfgs-iterations': 'network.lbfgsIterations',
    '--backend': 'network.backend',
    '--rg-nm': 'units.rgNm',
    '--segments': 'units.segments',
    '--segment-length-nm': 'units.segmentLengthNm',
    '--rg-nm-sd': 'units.rgNmSd',
    '--f-sd': 'uncertainty.f',
    '--segment-ratio-sd': 'uncertainty.segmentRatio',
  },
  'fit-bragg': {
    '--f': 'system.chain.f',
    '--segment-ratio': 'system.chain.segmentRatio',
    '--nx': 'cell.nx',
    '--ns': 'cell.ns',
    '--chiN-range': 'chiNRange',
    '--lorentz': 'lorentz',
    '--rg-nm': 'units.rgNm',
    '--rg-nm-sd': 'units.rgNmSd',
  },
  'fit-spacing': {
    '--f': 'system.chain.f',
    '--segment-ratio': 'system.chain.segmentRatio',
    '--nx': 'cell.nx',
    '--ns': 'cell.ns',
    '--chi-range': 'chiRange',
  },
  train: {
    '--adam-steps': 'training.adamSteps',
    '--lbfgs-iterations': 'training.lbfgsIterations',
  },
} as const;

/** The config value of the stress-free period: "equilibrium" in every config kind (version 2; version 1 said "optimize"). */
export const EQUILIBRIUM_PERIOD_CONFIG_VALUE: Record<'solve' | 'invert', string> = { solve: 'equilibrium', invert: 'equilibrium' };

/** Config keys that hold paths: read relative to the config file's folder, not the working directory. */
export const CONFIG_PATH_KEYS = ['solver.start.path', 'initFrom'] as const;

type Command = keyof typeof FLAG_CONFIG_PATHS;

function getAt(root: Record<string, unknown>, path: string): unknown {
  let cur: unknown = root;
  for (const k of path.split('.')) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<string, unknown>)[k];
  }
  return cur;
}

function setAt(root: Record<string, unknown>, path: string, value: unknown): void {
  const keys = path.split('.');
  let cur = root;
  for (const k of keys.slice(0, -1)) {
    const v = cur[k];
    if (!v || typeof v !== 'object' || Array.isArray(v)) cur[k] = {};
    cur = cur[k] as Record<string, unknown>;
  }
  cur[keys[keys.length - 1]] = value;
}

export class ConfigInput<C extends Command> {
  readonly raw: Record<string, unknown>;
  /** config path → the flag that set it */
  private readonly byFlag = new Map<string, string>();

  constructor(
    private readonly command: C,
    readonly configPath: string | undefined,
    defaults: Record<string, unknown>,
  ) {
    this.raw = configPath ? readRawConfig(configPath) : structuredClone(defaults);
    if (configPath) {
      for (const key of CONFIG_PATH_KEYS) {
        const v = getAt(this.raw, key);
        if (typeof v === 'string' && v !== '' && !isAbsolute(v)) setAt(this.raw, key, resolve(dirname(configPath), v));
      }
    }
  }

  /** The value at a config path (after flags). */
  get(path: string): unknown {
    return getAt(this.raw, path);
  }

  /** Start a config object afresh (a flag that picks a chain type drops the other chain's keys). */
  reset(path: string): void {
    setAt(this.raw, path, {});
  }

  /** Set the config key of `flag` (from FLAG_CONFIG_PATHS) to an already parsed value. */
  set(flag: keyof (typeof FLAG_CONFIG_PATHS)[C] & string, value: unknown): void {
    const path = (FLAG_CONFIG_PATHS[this.command] as Record<string, string>)[flag];
    setAt(this.raw, path, value);
    this.byFlag.set(path, flag);
  }

  /** A decimal flag onto its config key (when given). */
  number(flag: keyof (typeof FLAG_CONFIG_PATHS)[C] & string, text: string | undefined): number | undefined {
    if (text === undefined) return undefined;
    const v = parseDecimal(flag, text);
    if (typeof v === 'string') throw new InputError(v);
    this.set(flag, v);
    return v;
  }

  /** A period flag: a length, or the stress-free period ("equilibrium"), or the extra words allowed. */
  period(flag: keyof (typeof FLAG_CONFIG_PATHS)[C] & string, text: string | undefined, extra: readonly string[] = []): void {
    if (text === undefined) return;
    const word = text.trim().toLowerCase();
    if (word === 'equilibrium') return this.set(flag, EQUILIBRIUM_PERIOD_CONFIG_VALUE[this.command as 'solve' | 'invert']);
    if (extra.includes(word)) return this.set(flag, word);
    const v = parseDecimal(flag, text);
    if (typeof v === 'string') throw new InputError(`${flag}: got ${JSON.stringify(text)}; allowed: a period in Rg (a number > 0), or ${['equilibrium', ...extra].map((w) => `"${w}"`).join(', ')}${/^optimi[sz]/i.test(word) ? ' (the stress-free period is "equilibrium")' : ''}`);
    this.set(flag, v);
  }

  /** Where a config path came from, as the user would recognise it, and whether it is a default. */
  private source(path: string): { where: string; isDefault: boolean } {
    for (const [p, flag] of this.byFlag) if (path === p || path.startsWith(`${p}.`) || p.startsWith(`${path}.`)) return { where: `${flag} → ${path}`, isDefault: false };
    if (this.configPath) return { where: `${this.configPath}: ${path}`, isDefault: false };
    return { where: path, isDefault: true };
  }

  /** Where a config path's value came from, as the user would recognise it (a flag, or the file and key). */
  origin(path: string): string {
    return this.source(path).where;
  }

  /** Validate with the schema; every problem is one line naming its source, value and what is allowed. */
  parse<S extends z.ZodType>(schema: S): z.infer<S> {
    // A version-1 config gets the list of renames it needs, not a page of unknown fields.
    const old = version1Message(this.raw, this.configPath ?? 'flags');
    if (old) throw new InputError(old);
    const r = schema.safeParse(this.raw);
    if (r.success) return r.data;
    const lines = r.error.issues.map((issue) => {
      const path = issue.path.map(String).join('.');
      if (issue.code === 'unrecognized_keys') {
        return `${this.configPath ?? 'flags'}: ${path || '(top level)'}: unknown field(s) ${issue.keys.map((k) => JSON.stringify(k)).join(', ')}; remove them (check the spelling)`;
      }
      const { where, isDefault } = path ? this.source(path) : { where: `${this.configPath ?? 'flags'}: (top level)`, isDefault: false };
      return `${where}: got ${describeValue(getAt(this.raw, path))}${isDefault ? ' (the default)' : ''}; ${issueMessage(issue)}`;
    });
    throw new InputError(lines.join('\n'));
  }
}
