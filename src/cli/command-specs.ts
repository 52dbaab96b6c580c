/**
 * Every command once: its name and the module that declares its flags and action, loaded
 * only when that command runs (start-up matters: `--version`, `spinodal` and `schema` must
 * not load the solvers, the reports or chart.js). `mesofield --help` and `schema --synopsis` load them all.
 */
import type { Command } from 'commander';

type Register = (program: Command) => void;

export const COMMAND_SPECS: Record<string, () => Promise<Register>> = {
  solve: async () => (await import('./commands/solve.js')).registerSolve,
  demo: async () => (await import('./commands/demo.js')).registerDemo,
  spinodal: async () => (await import('./commands/spinodal.js')).registerSpinodal,
  // train.ts declares both train and evaluate.
  train: async () => (await import('./commands/train.js')).registerTrain,
  evaluate: async () => (await import('./commands/train.js')).registerTrain,
  synth: async () => (await import('./commands/synth.js')).registerSynth,
  invert: async () => (await import('./commands/invert.js')).registerInvert,
  report: async () => (await import('./commands/report.js')).registerReport,
  sweep: async () => (await import('./commands/sweep.js')).registerSweep,
  predict: async () => (await import('./commands/predict.js')).registerPredict,
  'fit-scattering': async () => (await import('./commands/fit-scattering.js')).registerFitScattering,
  'bragg-pattern': async () => (await import('./commands/bragg.js')).registerBragg,
  'fit-bragg': async () => (await import('./commands/fit-bragg.js')).registerFitBragg,
  'fit-spacing': async () => (await import('./commands/fit-spacing.js')).registerFitSpacing,
  schema: async () => (await import('./commands/schema.js')).registerSchema,
  reflectivity: async () => (await import('./commands/reflectivity.js')).registerReflectivity,
};

/** The registration functions needed for these arguments: the named command's, or all (help, unknown). */
export async function registrations(args: readonly string[]): Promise<Register[]> {
  const name = args.find((a) => !a.startsWith('-'));
  const wantsRootOnly = name === undefined && args.some((a) => a === '--version' || a === '-V');
  if (wantsRootOnly) return [];
  // `schema --synopsis` prints every command's flags, so it needs them all registered.
  const wantsAll = name === 'schema' && args.includes('--synopsis');
  if (name !== undefined && name in COMMAND_SPECS && name !== 'help' && !wantsAll) return [await COMMAND_SPECS[name]()];
  const all = await Promise.all(Object.values(COMMAND_SPECS).map((load) => load()));
  return [...new Set(all)];
}
