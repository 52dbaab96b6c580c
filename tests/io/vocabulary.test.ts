/**
 * One vocabulary (docs/vocabulary.md): one name per concept in flags, config keys and file
 * keys; the README synopsis is what the commands declare; numbers and wording in messages
 * say no more than the tool knows.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { inversionResultSchema } from '../../src/io/formats/inversion.js';
import { braggFitFileSchema, spacingFitFileSchema } from '../../src/io/formats/measurement-fits.js';
import { braggPatternFileSchema } from '../../src/io/formats/bragg-pattern.js';
import { scatteringResultSchema } from '../../src/io/formats/scattering-fit.js';
import { solutionFileSchema, summarize } from '../../src/io/formats/solution.js';
import { predictionSchema, surrogateCheckpointSchema, surrogateMetricsSchema } from '../../src/io/formats/surrogate.js';
import { shardFileSchema, sweepTableSchema } from '../../src/io/formats/sweep.js';
import { synthTruthSchema } from '../../src/io/formats/synth-truth.js';
import { checkpointFileSchema, trainMetricsFileSchema } from '../../src/io/formats/training.js';
import { formatNumber } from '../../src/io/number-format.js';
import { CONFIG_SCHEMAS } from '../../src/io/schemas/config-schemas.js';
import { solutionSummaryLines } from '../../src/io/solution-text.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { bulkPhaseNote, lamellarWindowLower } from '../../src/physics/lamellar-window.js';
import { compareSolutions } from '../../src/physics/solution-metrics.js';
import { solveFixedCell } from '../../src/spectral/scft-solver.js';
import { runCli } from '../helpers/run-cli.js';

const FORMAT_SCHEMAS: Record<string, z.ZodType> = {
  solution: solutionFileSchema,
  'synth-truth': synthTruthSchema,
  checkpoint: checkpointFileSchema,
  'train-metrics': trainMetricsFileSchema,
  'surrogate-checkpoint': surrogateCheckpointSchema,
  'surrogate-metrics': surrogateMetricsSchema,
  prediction: predictionSchema,
  inversion: inversionResultSchema,
  'sweep-shard': shardFileSchema,
  'sweep-table': sweepTableSchema,
  'bragg-fit': braggFitFileSchema,
  'spacing-fit': spacingFitFileSchema,
  'bragg-pattern': braggPatternFileSchema,
  'fit-scattering-result': scatteringResultSchema,
};

type Json = Record<string, unknown>;

/** Every property name of a JSON Schema, recursively; with `values`, its string literals (const, enum) instead. */
function names(schema: Json, out = new Set<string>(), values = false): Set<string> {
  const walk = (v: unknown): void => {
    if (Array.isArray(v)) return v.forEach(walk);
    if (v === null || typeof v !== 'object') return;
    const o = v as Json;
    if (!values && o.properties && typeof o.properties === 'object') for (const k of Object.keys(o.properties)) out.add(k);
    if (values && typeof o.const === 'string') out.add(o.const);
    if (values && Array.isArray(o.enum)) for (const e of o.enum) if (typeof e === 'string') out.add(e);
    Object.values(o).forEach(walk);
  };
  walk(schema);
  return out;
}

const jsonSchema = (s: z.ZodType, io: 'input' | 'output') => z.toJSONSchema(s, { io, unrepresentable: 'any' }) as Json;
const camel = (flag: string) => flag.replace(/-([a-z])/g, (_, c: string) => c.toUpperCase());

/**
 * Known synonym groups (names that have meant the same concept in this project; the first is
 * the one kept, docs/vocabulary.md). In configs and flags at most one name of a group may appear.
 */
const SYNONYMS: string[][] = [
  ['period', 'periodRg'],
  ['solver', 'reference'],
  ['parameters', 'grid'],
  ['adamSteps', 'steps', 'networkSteps'],
  ['lbfgsIterations', 'networkLbfgs', 'lbfgsSteps'],
  ['segmentRatio', 'segmentLengthRatio', 'segmentLengths', 'ratio', 'bA', 'bB'],
  ['chain', 'preset'],
  ['firstBlockShare', 'share'],
  ['freeEnergyExcess', 'deltaF', 'excessFreeEnergy'],
  ['freeEnergyDisordered', 'disorderedFreeEnergy', 'FDisordered'],
];
/**
 * In the files the tool writes, `reference` (the reference solution) and `grid` (a solution's
 * values on its spatial grid) name other concepts than a config's solver block and parameter
 * axes, so those two groups are checked in configs and flags only.
 */
const CONFIG_ONLY = new Set(['solver', 'parameters']);

describe('one vocabulary', () => {
  const synopsis = runCli(['schema', '--synopsis']);

  it('the README synopsis is the one the commands declare (regenerate: mesofield schema --synopsis)', () => {
    expect(synopsis.code, synopsis.stderr).toBe(0);
    expect(readFileSync('README.md', 'utf8')).toContain(`\`\`\`text\n${synopsis.stdout}\`\`\``);
  });

  it('no two names of one concept across the flags of every command and the keys of every config kind', () => {
    const flags = new Set([...synopsis.stdout.matchAll(/--([a-zA-Z-]+)/g)].map((m) => camel(m[1])));
    expect(flags.has('segmentRatio') && flags.has('adamSteps')).toBe(true);
    const configNames = new Set<string>(flags);
    for (const s of Object.values(CONFIG_SCHEMAS)) names(jsonSchema(s, 'input'), configNames);
    const fileNames = new Set<string>();
    for (const s of Object.values(FORMAT_SCHEMAS)) names(jsonSchema(s, 'output'), fileNames);
    const clashes: string[] = [];
    for (const group of SYNONYMS) {
      const inConfigs = group.filter((n) => configNames.has(n));
      if (inConfigs.length > 1) clashes.push(`configs/flags use ${inConfigs.join(' and ')}`);
      if (inConfigs.some((n) => n !== group[0])) clashes.push(`configs/flags use ${inConfigs.join(', ')} instead of ${group[0]}`);
      if (CONFIG_ONLY.has(group[0])) continue;
      const inFiles = group.filter((n) => fileNames.has(n));
      if (inFiles.some((n) => n !== group[0])) clashes.push(`written files use ${inFiles.join(', ')} instead of ${group[0]}`);
    }
    expect(clashes).toEqual([]);
    // Allowed values too: the stress-free period is "equilibrium" everywhere, never "optimize".
    const values = new Set<string>();
    for (const s of [...Object.values(CONFIG_SCHEMAS), ...Object.values(FORMAT_SCHEMAS)]) names(jsonSchema(s, 'input'), values, true);
    expect(values.has('equilibrium')).toBe(true);
    expect(values.has('optimize')).toBe(false);
  });

  it('numbers in messages carry no float noise (common practice, no source)', () => {
    expect(formatNumber(0.6699999999999999)).toBe('0.67');
    expect(formatNumber(4.619999999999999)).toBe('4.62');
    expect(formatNumber(1.776e-15)).toBe('1.776e-15');
    expect(formatNumber(-1.0153211, 6)).toBe('-1.01532');
    expect(formatNumber(2e6)).toBe('2e+6');
  });
});

describe('honest wording', () => {
  it('the bulk lamellar window: f = 0.27 at χN = 22 is outside it, 0.5 and 0.4 at χN = 40 inside (Matsen & Bates, Macromolecules 29, 1091 (1996), boundaries from memory)', () => {
    const diblock = (f: number) => ({ type: 'diblock' as const, f, segmentRatio: 1 });
    expect(bulkPhaseNote('lamellar', diblock(0.27), 22)).toMatch(/f = 0\.27 is outside about 0\.3\d–0\.6\d, where lamellae are the bulk phase at χN = 22/);
    expect(bulkPhaseNote('lamellar', diblock(0.73), 22)).toMatch(/outside/);
    expect(bulkPhaseNote('lamellar', diblock(0.5), 22)).toBeUndefined();
    expect(bulkPhaseNote('lamellar', diblock(0.4), 40)).toBeUndefined();
    expect(bulkPhaseNote('disordered', diblock(0.27), 22)).toBeUndefined();
    // No window is claimed for a triblock or an asymmetric diblock.
    expect(bulkPhaseNote('lamellar', { type: 'triblock', f: 0.27, firstBlockShare: 0.5, segmentRatio: 1 }, 22)).toBeUndefined();
    expect(bulkPhaseNote('lamellar', { ...diblock(0.27), segmentRatio: 1.5 }, 22)).toBeUndefined();
    // The window widens with χN (the gyroid region moves to lower f at stronger segregation).
    expect(lamellarWindowLower(40)!).toBeLessThan(lamellarWindowLower(15)!);
  });

  it('a disordered result prints no period and no F − F_disordered; a lamella prints both', () => {
    const system = (chiN: number) => ({ chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN });
    // Below Leibler's spinodal (χN_s = 10.495 at f = 1/2) the melt is disordered.
    const dis = summarize(solveFixedCell({ system: system(8), cell: new PeriodicCell(3.6, 16, 1), contour: 40 }));
    expect(dis.phase).toBe('disordered');
    expect(dis.period).toBeNull();
    expect(dis.freeEnergyExcess).toBeNull();
    const text = solutionSummaryLines(dis).join('\n');
    expect(text).not.toMatch(/period|F − F_disordered|ΔF/);
    const lam = summarize(solveFixedCell({ system: system(15), cell: new PeriodicCell(3.8, 16, 1), contour: 40 }));
    const t2 = solutionSummaryLines(lam).join('\n');
    expect(t2).toMatch(/phase: lamellar \(compared with disorder only\)/);
    expect(t2).toMatch(/period 3\.8 Rg/);
    expect(t2).toMatch(/F − F_disordered = -0\.\d+ kT\/chain/);
  });

  it('incompressibility is not reported for a chain in prescribed fields, where φA + φB = 1 is no constraint', () => {
    const field = { chain: { type: 'homopolymer' as const, species: 'A' as const, segmentLength: 1 }, chiN: 0, externalField: { A: { type: 'cosine' as const, amplitude: 2, mode: 1, offset: 0 } } };
    const a = solveFixedCell({ system: field, cell: new PeriodicCell(4, 16, 1), contour: 40 });
    expect(compareSolutions(a, a)).not.toHaveProperty('incompressibilityMax');
    const melt = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
    const b = solveFixedCell({ system: melt, cell: new PeriodicCell(3.8, 16, 1), contour: 40 });
    expect(compareSolutions(b, b).incompressibilityMax).toBeLessThan(1e-8);
  });
});
