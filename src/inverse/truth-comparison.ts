/**
 * How the estimates of a synthetic profile compare with the truth that made it (the
 * sidecar `PROFILE.truth.json` that `synth --out` writes, or the demo's own truth): the
 * error of each χN and, for the network estimator, of the discovered exchange field.
 *
 * Units: χN dimensionless; fields in kT per chain on the model cell grid (x in Rg).
 * The true exchange field is the self-consistent one at the true χN in the classical
 * estimate's cell (the frame the network works in), started from the classical solution so
 * the two lamellae share their phase.
 */
import { readFormat } from '../io/formats/file-format.js';
import { synthTruthSchema } from '../io/formats/synth-truth.js';
import type { SynthTruth } from '../io/formats/synth-truth.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import { solveFixedCell } from '../spectral/scft-solver.js';
import type { ClassicalEstimate } from './classical.js';
import type { NetworkEstimate } from './network-estimator.js';

export interface TruthComparison {
  source: string;
  chiN: number;
  estimators: Record<string, { chiN: number; error: number; relativeError: number; exchangeFieldRelativeL2?: number }>;
}

export function readTruthSidecar(path: string): SynthTruth {
  return readFormat(path, synthTruthSchema);
}

export function compareWithTruth(source: string, truthChiN: number, chain: ChainSpec, cl: ClassicalEstimate, ne?: NetworkEstimate): TruthComparison {
  const entry = (chiN: number) => ({ chiN, error: chiN - truthChiN, relativeError: chiN / truthChiN - 1 });
  const estimators: TruthComparison['estimators'] = { classical: entry(cl.chiN) };
  if (ne) {
    const sol = cl.solution;
    const truth = solveFixedCell({ system: { chain, chiN: truthChiN }, cell: sol.cell.withLength(cl.period), contour: sol.contour, initial: sol.w });
    let num = 0;
    let den = 0;
    for (let j = 0; j < sol.nx; j++) {
      const t = truth.w.A[j] - truth.w.B[j];
      num += (ne.runs[0].exchange[j] - t) ** 2;
      den += t * t;
    }
    estimators.network = { ...entry(ne.chiN), exchangeFieldRelativeL2: Math.sqrt(num / den) };
  }
  return { source, chiN: truthChiN, estimators };
}

export function truthText(t: TruthComparison): string {
  const rows = Object.entries(t.estimators).map(
    ([name, e]) =>
      `  ${name}: χN error ${e.error >= 0 ? '+' : ''}${e.error.toPrecision(3)} (${(100 * e.relativeError).toFixed(2)} %)` +
      (e.exchangeFieldRelativeL2 !== undefined ? `, discovered wA − wB relative L2 error ${e.exchangeFieldRelativeL2.toExponential(2)}` : ''),
  );
  return `against the truth in ${t.source} (χN = ${t.chiN}):\n${rows.join('\n')}\n`;
}
