/** `mesofield predict CHECKPOINT --chiN X …`: a thin layer over surrogate/predict.ts. */
import type { Command } from 'commander';
import type { OutputDirectory } from '../../io/output-directory.js';
import { claimOut, withOutput } from '../run-output.js';
import { nothingWritten, withStopPoint } from '../short-run-stop.js';
import type { StopPoint } from '../short-run-stop.js';
import { InputError } from '../../io/errors.js';
import { formatNumber } from '../../io/number-format.js';
import { PREDICTION_VERSION, predictionSchema } from '../../io/formats/surrogate.js';
import { phaseLabel } from '../../physics/lamellar-window.js';
import type { Phase } from '../../physics/result.js';
import { provenance } from '../../io/versions.js';
import { PARAMETER_LABELS, PARAMETER_NAMES } from '../../surrogate/parameter-space.js';
import type { ParameterPoint } from '../../surrogate/parameter-space.js';
import { checkPointCount, predictAt } from '../../surrogate/predict.js';
import { checkpointKind } from '../../io/checkpoint-kind.js';
import type { Prediction } from '../../surrogate/predict.js';
import { action, numberFlag } from '../run-command.js';
import { backendFlag } from './train-flags.js';

interface PredictFlags {
  chiN?: string;
  f?: string;
  segmentRatio?: string;
  points?: string;
  json?: boolean;
  out?: string;
  overwrite?: boolean;
  allowExtrapolation?: boolean;
  backend?: string;
  quiet?: boolean;
}

const fmt = (v: number, d = 6) => formatNumber(v, d);

function profileCsv(p: Prediction): string {
  const rows = ['x,t,phiA,phiB,wA,wB'];
  p.x.forEach((x, j) => rows.push([x, p.t[j], p.phiA[j], p.phiB[j], p.wA[j], p.wB[j]].map((v) => v.toPrecision(17)).join(',')));
  return `${rows.join('\n')}\n`;
}

export function registerPredict(program: Command): void {
  program
    .command('predict')
    .description('the lamella a trained surrogate predicts at a parameter point: profile, fields, period, Q and F')
    .argument('<checkpoint>', 'surrogate checkpoint directory written by train (kind "surrogate")')
    .option('--chiN <x>', 'χN of the point')
    .option('--f <f>', 'A fraction, > 0 and < 1 (needed when the surrogate varies f; otherwise only its fixed f is accepted)')
    .option('--segment-ratio <r>', 'b_A/b_B (needed when the surrogate varies it)')
    .option('--points <n>', 'x points over one period (default: the training grid)')
    .option('--json', 'print the prediction as JSON on stdout')
    .option('--out <dir>', 'write prediction.json and profile.csv into this directory')
    .option('--overwrite', 'replace a previous predict output in --out (only the files mesofield wrote there)')
    .option('--allow-extrapolation', 'predict outside the trained range (with a warning) instead of refusing')
    .option('--backend <b>', 'tfjs backend: auto | native | wasm | cpu')
    .option('--quiet', 'no timing or warnings on stderr')
    .action(
      action(async (dir: string, flags: PredictFlags) => {
        const say = (m: string) => {
          if (!flags.quiet) process.stderr.write(`predict: ${m}\n`);
        };
        const points = numberFlag('--points', flags.points);
        checkPointCount(points);
        const backend = backendFlag(flags.backend);
        const out = claimOut(flags, 'predict');
        // The query runs on this thread in one stretch: a signal stops the run before it writes (short-run-stop.ts).
        return withStopPoint('predict', nothingWritten('predict', flags.out), (stop) => withOutput(out, () => predictCommand(dir, flags, points, backend, out, say, stop)));
      }),
    );
}

async function predictCommand(dir: string, flags: PredictFlags, points: number | undefined, backend: ReturnType<typeof backendFlag>, out: OutputDirectory | undefined, say: (m: string) => void, stop: StopPoint): Promise<void> {
  const kind = checkpointKind(dir);
  if (kind !== undefined && kind !== 'surrogate-checkpoint') {
    throw new InputError(`${dir}: checkpoint kind ${JSON.stringify(kind)}; predict needs a surrogate checkpoint (kind "surrogate-checkpoint", from mesofield train on a config of kind "surrogate"); for a single-point network use mesofield evaluate`);
  }
  const t0 = performance.now();
  say(`loading the surrogate in ${dir} (tfjs start-up and weights); Ctrl-C stops it before anything is written`);
  const { selectBackend } = await import('../../autodiff/backend.js');
  const { loadSurrogate } = await import('../../surrogate/surrogate-checkpoint.js');
  const handle = await selectBackend(backend);
  const { file, model } = loadSurrogate(handle.tf, dir);
  const loadSeconds = (performance.now() - t0) / 1000;
    try {
      const given: Record<string, string | undefined> = { chiN: flags.chiN, f: flags.f, segmentRatio: flags.segmentRatio };
      const point = {} as ParameterPoint;
      for (const name of PARAMETER_NAMES) {
        const { flag, symbol } = PARAMETER_LABELS[name];
        const v = numberFlag(flag, given[name]);
        const axis = model.space.axes.find((a) => a.name === name);
        if (v !== undefined) point[name] = v;
        else if (axis) throw new InputError(`${flag}: missing; the surrogate was trained for ${symbol} in [${axis.min}, ${axis.max}]: give a value`);
        else point[name] = model.space.fixed[name]!;
      }
      const p = predictAt(model, point, { points, allowExtrapolation: flags.allowExtrapolation });
      for (const m of p.outside) say(`warning: extrapolating: ${m}; the error there is unknown`);
      say(`loaded in ${loadSeconds.toFixed(2)} s (tfjs ${handle.backend} start-up and weights); query ${(1000 * p.seconds).toFixed(2)} ms`);
      const errors = file.metrics?.errors;
      const result = predictionSchema.parse({
        kind: 'prediction',
        version: PREDICTION_VERSION,
        checkpoint: dir,
        provenance: { ...provenance({ backend: handle.backend, tfjs: handle.tfjsVersion }) },
        trainedRange: model.space.axes.map((a) => ({ name: a.name, min: a.min, max: a.max })),
        extrapolated: p.outside.length > 0,
        ...(errors ? { heldOutErrors: { phiARelativeL2Max: errors.phiARelativeL2.max, freeEnergyErrorMax: errors.freeEnergyError.max } } : {}),
        ...p,
      });
      for (const w of p.warnings) say(`warning: UNRELIABLE extrapolation: ${w}`);
      const summary = [
        ...p.warnings.map((w) => `UNRELIABLE (extrapolated answer failed a check): ${w}`),
        `surrogate at ${model.space.describe(point)}${p.outside.length ? ' (EXTRAPOLATED: outside the trained range)' : ''}: ${phaseLabel(p.phase as Phase)}, period ${fmt(p.period)} Rg (interpolated from the anchors)`,
        `F = ${fmt(p.freeEnergy, 10)} kT/chain (disordered ${fmt(p.freeEnergyDisordered)}), Q = ${fmt(p.Q, 10)} (from q†: ${fmt(p.QDagger, 10)}); SCFT residual of the surrogate's fields ${p.residual.toExponential(2)} kT`,
        ...(errors ? [`held-out check at training: φA relative L2 ≤ ${formatNumber(errors.phiARelativeL2.max, 3)}, |F error| ≤ ${formatNumber(errors.freeEnergyError.max, 3)} kT/chain`] : []),
      ];
      await stop.beforeWriting();
      if (out) say(`wrote ${out.write({ 'prediction.json': `${JSON.stringify(result, null, 2)}\n`, 'profile.csv': profileCsv(p) }).join(', ')}`);
      if (flags.json) process.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
      else if (flags.out) process.stdout.write(`${summary.join('\n')}\n`);
      else {
        const table = p.x.map((x, j) => [x, p.t[j], p.phiA[j], p.phiB[j], p.wA[j], p.wB[j]].map((v) => v.toFixed(6).padStart(11)).join(' '));
        process.stdout.write(`${[...summary, ['x/Rg', 't', 'phiA', 'phiB', 'wA', 'wB'].map((h) => h.padStart(11)).join(' '), ...table].join('\n')}\n`);
      }
  } finally {
    model.dispose();
  }
}
