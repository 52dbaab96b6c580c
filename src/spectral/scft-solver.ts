/**
 * Self-consistent field iteration in a fixed cell: the spectral reference.
 *
 * Units: x in Rg, fields and free energies in kT per chain. Each iteration solves the MDE
 * for q and q† (propagator-solver.ts), forms the densities, and updates the fields with
 * the deviation of physics/scft-equations.ts: a few simple-mixing steps, then Anderson
 * mixing (anderson-mixer.ts). The gauge (mean pressure field zero) is fixed every step.
 * The solution record is built by physics/solution-record.ts (F, verdict, phase convention).
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import { buildChain, ModelError } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import type { Cell } from '../physics/cell/cell.js';
import { contourWithTotal } from '../physics/contour.js';
import type { Contour } from '../physics/contour.js';
import { externalFields, zeroFields } from '../physics/fields.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { Phase, ScftSolution } from '../physics/result.js';
import { fieldDeviation, fieldsFromComposition, fixGauge, mixedFieldUpdate } from '../physics/scft-equations.js';
import { buildSolution, DISORDER_SPREAD } from '../physics/solution-record.js';
import { inverseStructureFactor, spinodal } from '../physics/rpa.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { spectralSchema } from '../io/schemas/spectral-schema.js';
import { AndersonMixer } from './anderson-mixer.js';
import { PropagatorSolver } from './propagator-solver.js';
import type { ChainDensities } from './propagator-solver.js';

/** The safeguard's threshold: a residual this many times the best so far counts as diverging. */
const DIVERGENCE_GROWTH = 100;
const MAX_RESTARTS = 8;
const MIN_MIXING = 0.05;

export interface FixedCellRequest {
  system: SystemSpec;
  cell: Cell;
  /** Contour steps over the whole chain (spread over the blocks, physics/contour.ts), or a contour. */
  contour: number | Contour;
  options?: Partial<SpectralOptions>;
  /** Warm start: fields of an earlier solution (resampled by the cell when the grid differs; L may differ). */
  initial?: SpeciesArrays;
  keepPropagators?: boolean;
  /** Called after each field iteration with its number and residual max |w_out − w| (kT): progress only. */
  onIteration?: (iteration: number, residual: number) => void;
}

/**
 * A bulk lamellar period to start from: 2π/q* at the spinodal, stretched by (χN/χN_s)^{1/5}
 * above it (between Semenov's strong-segregation 1/6 and the steeper growth SCFT shows at
 * moderate χN). A guess only: period searches and film starts correct it.
 */
export function bulkPeriodGuess(chain: Chain, chiN: number): number {
  if (chain.species.length < 2) return 1;
  const sp = spinodal(chain);
  return sp.period * Math.pow(Math.max(1, chiN / sp.chiN), 1 / 5);
}

/** Anderson history for "auto" (see the schema). */
export function autoHistory(chiN: number): number {
  return Math.min(100, Math.max(20, Math.ceil(chiN / 2.5)));
}

export function defaultSpectralOptions(partial: Partial<SpectralOptions> = {}): SpectralOptions {
  return { ...spectralSchema.parse({}), ...partial };
}

export function contourOf(chain: Chain, spec: number | Contour): Contour {
  return typeof spec === 'number' ? contourWithTotal(chain, spec) : spec;
}

/**
 * The initial composition guess φ_A = f + a·pattern with the cell's lamellar start pattern
 * (cell.startPattern; a film's needs the bulk period, guessed from the RPA), mapped to fields
 * by self-consistency.
 */
export function cosineStart(chain: Chain, chiN: number, cell: Cell, amplitude: number): SpeciesArrays {
  const f = chain.speciesFraction.A;
  const a = Math.min(amplitude, 0.95 * Math.min(f, 1 - f));
  const { pattern } = cell.startPattern(cell.kind === 'periodic' ? cell.length : bulkPeriodGuess(chain, chiN));
  const phiA = Float64Array.from(pattern, (c) => f + a * c);
  // At χN = 0 self-consistency gives no field; seed the exchange field directly instead.
  return fieldsFromComposition(chain, Math.max(chiN, 1), phiA, cell);
}

/**
 * The RPA start: the unstable mode of the disordered melt is a cosine at q*; its
 * amplitude grows as (χN − χN_s)^{1/2} above the spinodal (mean-field Landau scaling),
 * so the guess takes a ≈ 0.5·((χN − χN_s)/χN_s)^{1/2}, kept within [0.05, 0.45].
 */
export function rpaStart(chain: Chain, chiN: number, cell: Cell): SpeciesArrays {
  const sp = spinodal(chain);
  const reduced = Math.max(0, (chiN - sp.chiN) / sp.chiN);
  const a = Math.min(0.45, Math.max(0.05, 0.5 * Math.sqrt(reduced)));
  return cosineStart(chain, chiN, cell, a);
}

function initialFields(req: FixedCellRequest, chain: Chain, options: SpectralOptions): SpeciesArrays {
  const cell = req.cell;
  if (req.initial) {
    return { A: cell.resample(req.initial.A, cell.n), B: cell.resample(req.initial.B, cell.n) };
  }
  const start = options.start;
  switch (start.type) {
    case 'cosine':
      return cosineStart(chain, req.system.chiN, cell, start.amplitude);
    case 'rpa':
      return rpaStart(chain, req.system.chiN, cell);
    case 'file':
      throw new ModelError('solver.start', start, 'a file start must be loaded by the caller and passed as initial fields');
  }
}

/** Number of A-rich domains: upward crossings of φ_A through its mean on the grid (periodic wrap-around). */
export function countDomains(phiA: Float64Array): number {
  let mean = 0;
  for (const v of phiA) mean += v;
  mean /= phiA.length;
  let n = 0;
  for (let j = 0; j < phiA.length; j++) {
    const a = phiA[j] - mean;
    const b = phiA[(j + 1) % phiA.length] - mean;
    if (a < 0 && b >= 0) n++;
  }
  return n;
}

interface SolveContext {
  req: FixedCellRequest;
  chain: Chain;
  contour: Contour;
  t0: number;
}

/** The solution record of fields w and the densities they give. */
function record(c: SolveContext, w: SpeciesArrays, dens: ChainDensities, fields: { prescribed: boolean; iterations: number; residual: number; converged: boolean; phase?: Phase; notes: string[] }): ScftSolution {
  const { req, chain, contour } = c;
  return buildSolution({
    solver: 'spectral',
    system: req.system,
    chain,
    cell: req.cell,
    contour,
    w,
    phi: dens.phi,
    Q: dens.Q,
    QDagger: dens.QDagger,
    prescribedFields: fields.prescribed,
    iterations: fields.iterations,
    residual: fields.residual,
    converged: fields.converged,
    seconds: (performance.now() - c.t0) / 1000,
    notes: fields.notes,
    propagators: req.keepPropagators ? { s: contour.s, q: dens.q.map((a) => Float64Array.from(a)), qDagger: dens.qDagger.map((a) => Float64Array.from(a)) } : undefined,
    disorderSpread: DISORDER_SPREAD.spectral,
    phase: fields.phase,
  });
}

/**
 * The densities, Q and F of a melt in given fields w, from one propagator solve and no
 * iteration (how a field surrogate becomes a solution). `residual` is the SCFT residual
 * max |w_out − w| of the given fields (kT): how far they are from self-consistent;
 * `iterations` is 0 and `converged` says whether that residual is below the tolerance.
 */
export function solveInFields(req: Omit<FixedCellRequest, 'initial'> & { fields: SpeciesArrays }): ScftSolution {
  const t0 = performance.now();
  const options = defaultSpectralOptions(req.options);
  const chain = buildChain(req.system.chain);
  const cell = req.cell;
  if (req.fields.A.length !== cell.n || req.fields.B.length !== cell.n) throw new RangeError(`solveInFields: fields have ${req.fields.A.length} points, the cell ${cell.n}`);
  const contour = contourOf(chain, req.contour);
  const solver = new PropagatorSolver(chain, cell, contour, { richardson: options.richardson });
  solver.setFields(req.fields);
  const dens = solver.solve();
  const { residual } = fieldDeviation(chain, req.system.chiN, req.fields, dens.phi, cell);
  const notes = ['densities from one propagator solve in the given fields (no SCFT iteration)'];
  return record({ req, chain, contour, t0 }, req.fields, dens, { prescribed: false, iterations: 0, residual, converged: residual < options.tolerance, notes });
}

export function solveFixedCell(req: FixedCellRequest): ScftSolution {
  const t0 = performance.now();
  const options = defaultSpectralOptions(req.options);
  const chain = buildChain(req.system.chain);
  const contour = contourOf(chain, req.contour);
  const chiN = req.system.chiN;
  const fixed = externalFields(req.system, req.cell);

  if (fixed) {
    const solver = new PropagatorSolver(chain, req.cell, contour, { richardson: options.richardson });
    solver.setFields(fixed);
    const dens = solver.solve();
    const notes = ['single-chain problem in prescribed fields: no self-consistency; F = −ln Q'];
    return record({ req, chain, contour, t0 }, fixed, dens, { prescribed: true, iterations: 0, residual: 0, converged: true, notes });
  }

  const first = iterate(req, initialFields(req, chain, options), req.initial ? 0 : options.simpleSteps);
  if (first.phase !== 'disordered' || !first.converged || chain.species.length === 1) return first;
  // Above the cell's own spinodal the homogeneous state is linearly unstable (Leibler's RPA:
  // N/S(q) < 0 at the cell's lamellar wave number q = 2πp/L), so a collapse onto it is the
  // mixing scheme landing on an unstable fixed point, not the answer: restart from smaller,
  // RPA-sized starts before reporting disorder. (Seen: χN = 16, L = 3.75 Rg from the default
  // cosine start, while the lamella there has F 0.44 kT below the disordered state.)
  const q = req.cell.startPattern(bulkPeriodGuess(chain, chiN)).waveNumber;
  if (!(inverseStructureFactor(chain, chiN, q * q) < 0)) return first;
  const restarts: [string, SpeciesArrays][] = [
    ['the RPA start', rpaStart(chain, chiN, req.cell)],
    ['a cosine start of amplitude 0.1', cosineStart(chain, chiN, req.cell, 0.1)],
  ];
  for (const [name, w0] of restarts) {
    const r = iterate(req, w0, options.simpleSteps);
    if (r.converged && r.phase === 'lamellar') {
      r.notes.unshift(`the first start collapsed to the disordered state (${first.iterations} iterations), which is linearly unstable in this cell (RPA N/S(q) < 0 at q = 2πp/L); ${name} converged to the lamella`);
      return r;
    }
  }
  first.notes.push('the disordered state is linearly unstable in this cell (RPA N/S(q) < 0 at q = 2πp/L), but no restart reached a lamella');
  return first;

  /** The field iteration from w0: simple mixing for `simpleSteps` steps, then Anderson mixing. */
  function iterate(req: FixedCellRequest, w0: SpeciesArrays, simpleSteps: number): ScftSolution {
    const cell = req.cell;
    const n = cell.n;
    const solver = new PropagatorSolver(chain, cell, contour, { richardson: options.richardson });
    const notes: string[] = [];
    const finish = (w: SpeciesArrays, dens: ChainDensities, iterations: number, residual: number, converged: boolean, phase?: Phase): ScftSolution =>
      record({ req, chain, contour, t0 }, w, dens, { prescribed: false, iterations, residual, converged, phase, notes });
    let w = w0;
    fixGauge(chain, w, cell);
    const history = options.andersonHistory === 'auto' ? autoHistory(chiN) : options.andersonHistory;
    const mixer = new AndersonMixer(history, options.andersonMixing);
    const species = chain.species;
    const pack = (u: SpeciesArrays) => {
      const v = new Float64Array(species.length * n);
      species.forEach((k, i) => v.set(u[k], i * n));
      return v;
    };
    const unpack = (v: Float64Array): SpeciesArrays => {
      const u = zeroFields(n);
      species.forEach((k, i) => u[k].set(v.subarray(i * n, (i + 1) * n)));
      return u;
    };
    let residual = Infinity;
    // Divergence safeguard: when the residual grows far above the best one seen, the Anderson
    // history is dropped, the iteration restarts from the best fields and λ is halved
    // (common practice, no source; seen: χN = 500 from a cosine start, λ = 1).
    let best = { residual: Infinity, w };
    let restarts = 0;
    for (let it = 1; it <= options.maxIterations; it++) {
      solver.setFields(w);
      const dens = solver.solve();
      const upd = fieldDeviation(chain, chiN, w, dens.phi, cell);
      residual = upd.residual;
      req.onIteration?.(it, residual);
      const diverging = !Number.isFinite(residual) || !(dens.Q > 0) || (it > simpleSteps && residual > DIVERGENCE_GROWTH * best.residual);
      if (diverging && restarts < MAX_RESTARTS && Number.isFinite(best.residual)) {
        restarts++;
        mixer.reset();
        mixer.mixing = Math.max(MIN_MIXING, mixer.mixing / 2);
        w = { A: Float64Array.from(best.w.A), B: Float64Array.from(best.w.B) };
        continue;
      }
      if (!Number.isFinite(residual) || !(dens.Q > 0)) {
        notes.push(`iteration diverged at step ${it} (residual ${residual}, Q ${dens.Q}); try smaller andersonMixing or more simpleSteps`);
        return finish(w, dens, it, residual, false, 'lamellar');
      }
      if (residual < best.residual) best = { residual, w };
      if (restarts > 0 && it === options.maxIterations) notes.push(`the iteration was restarted ${restarts} time(s) from its best fields after the residual grew, with λ lowered to ${mixer.mixing}`);
      if (residual < options.tolerance) {
        const sol = finish(w, dens, it, residual, true);
        if (sol.phase === 'disordered') notes.push('the iteration collapsed to the homogeneous (disordered) state: no lamella at these parameters from this start');
        if (sol.phase === 'lamellar' && cell.translation) {
          const domains = countDomains(sol.phi.A);
          if (domains !== cell.periods) notes.push(`cell set up for ${cell.periods} period(s) but the solution has ${domains} A domain(s)`);
        }
        return sol;
      }
      if (it === options.maxIterations) {
        notes.push(`not converged after ${it} iterations (residual ${residual.toExponential(3)} > tolerance ${options.tolerance})`);
        return finish(w, dens, it, residual, false);
      }
      let next: SpeciesArrays;
      if (it <= simpleSteps || history === 0) {
        next = mixedFieldUpdate(chain, chiN, w, dens.phi, it <= simpleSteps ? options.simpleMixing : mixer.mixing, cell).w;
      } else {
        next = unpack(mixer.next(pack(w), pack(upd.deviation)));
        fixGauge(chain, next, cell);
      }
      w = next;
    }
    throw new Error('unreachable');
  }
}
