/**
 * The SCFT equations solved by Newton's method (numerics/newton-krylov.ts) instead of a
 * fixed-point iteration: it converges to the stationary point nearest its start whether that
 * point is stable or not, which is what a disordered state above its spinodal needs (a mixing
 * iteration leaves it along its unstable modes). The residual is the field deviation of
 * physics/scft-equations.ts; the gauge (the one null direction) is fixed on every iterate.
 *
 * Units: fields in kT per chain.
 */
import { buildChain } from '../physics/chain.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { fieldDeviation, fixGauge } from '../physics/scft-equations.js';
import { newtonKrylov } from '../numerics/newton-krylov.js';
import type { FixedCellRequest } from './scft-solver.js';
import { contourOf, defaultSpectralOptions, solveInFields } from './scft-solver.js';
import { PropagatorSolver } from './propagator-solver.js';

export function solveByNewton(req: Omit<FixedCellRequest, 'initial'> & { start: SpeciesArrays }): ScftSolution {
  const options = defaultSpectralOptions(req.options);
  const chain = buildChain(req.system.chain);
  const contour = contourOf(chain, req.contour);
  const cell = req.cell;
  const n = cell.n;
  const solver = new PropagatorSolver(chain, cell, contour, { richardson: options.richardson });
  const unpack = (x: Float64Array): SpeciesArrays => ({ A: x.slice(0, n), B: x.slice(n) });
  const residual = (x: Float64Array) => {
    const w = unpack(x);
    solver.setFields(w);
    const d = fieldDeviation(chain, req.system.chiN, w, solver.solve().phi, cell).deviation;
    const out = new Float64Array(2 * n);
    out.set(d.A);
    out.set(d.B, n);
    return out;
  };
  const x0 = new Float64Array(2 * n);
  x0.set(req.start.A);
  x0.set(req.start.B, n);
  const r = newtonKrylov(residual, x0, {
    tolerance: options.tolerance,
    project: (x) => {
      const w = unpack(x);
      fixGauge(chain, w, cell);
      x.set(w.A);
      x.set(w.B, n);
    },
  });
  const sol = solveInFields({ ...req, contour, fields: unpack(r.x) });
  sol.iterations = r.newtonSteps;
  sol.notes = [`solved by Newton–Krylov (${r.newtonSteps} Newton steps, ${r.residualEvaluations} propagator solves)${r.converged ? '' : `: not converged (residual ${r.residual.toExponential(2)})`}`];
  return sol;
}
