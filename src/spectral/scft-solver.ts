/**
 * Self-consistent field iteration in a fixed periodic cell: the spectral reference.
 *
 * Units: x in Rg, fields and free energies in kT per chain. Each iteration solves the MDE
 * for q and q† (propagator-solver.ts), forms the densities, and updates the fields with
 * the deviation of physics/scft-equations.ts: a few simple-mixing steps, then Anderson
 * mixing (anderson-mixer.ts). The gauge (mean pressure field zero) is fixed every step.
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import { buildChain, contourGrid, disorderedFreeEnergy, ModelError } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import { externalFields, zeroFields } from '../physics/fields.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { checkCell, gridPoints, resamplePeriodic, spreadOf } from '../physics/grid.js';
import type { Phase, ScftSolution } from '../physics/result.js';
import { fieldDeviation, fieldsFromComposition, fixGauge, freeEnergy } from '../physics/scft-equations.js';
import { inverseStructureFactor, spinodal } from '../physics/rpa.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { spectralSchema } from '../io/schemas/spectral-schema.js';
import { AndersonMixer } from './anderson-mixer.js';
import { PropagatorSolver } from './propagator-solver.js';

/** Below this spread of φ_A a melt is homogeneous: the iteration has found the disordered state. */
export const DISORDER_AMPLITUDE = 1e-5;

export interface FixedCellRequest {
  system: SystemSpec;
  /** Cell length L in Rg. */
  length: number;
  periods: number;
  nx: number;
  ns: number;
  options?: Partial<SpectralOptions>;
  /** Warm start: fields of an earlier solution (resampled when nx differs; L may differ). */
  initial?: SpeciesArrays;
  keepPropagators?: boolean;
}

export function defaultSpectralOptions(partial: Partial<SpectralOptions> = {}): SpectralOptions {
  return { ...spectralSchema.parse({}), ...partial };
}

/** The initial composition guess φ_A = f + a cos(2π p x / L), mapped to fields by self-consistency. */
export function cosineStart(chain: Chain, chiN: number, nx: number, periods: number, amplitude: number): SpeciesArrays {
  const f = chain.speciesFraction.A;
  const a = Math.min(amplitude, 0.95 * Math.min(f, 1 - f));
  const phiA = new Float64Array(nx);
  for (let j = 0; j < nx; j++) phiA[j] = f + a * Math.cos((2 * Math.PI * periods * j) / nx);
  // At χN = 0 self-consistency gives no field; seed the exchange field directly instead.
  const w = fieldsFromComposition(chain, Math.max(chiN, 1), phiA);
  return w;
}

/**
 * The RPA start: the unstable mode of the disordered melt is a cosine at q*; its
 * amplitude grows as (χN − χN_s)^{1/2} above the spinodal (mean-field Landau scaling),
 * so the guess takes a ≈ 0.5·((χN − χN_s)/χN_s)^{1/2}, kept within [0.05, 0.45].
 */
export function rpaStart(chain: Chain, chiN: number, nx: number, periods: number): SpeciesArrays {
  const sp = spinodal(chain);
  const reduced = Math.max(0, (chiN - sp.chiN) / sp.chiN);
  const a = Math.min(0.45, Math.max(0.05, 0.5 * Math.sqrt(reduced)));
  return cosineStart(chain, chiN, nx, periods, a);
}

function initialFields(req: FixedCellRequest, chain: Chain, options: SpectralOptions): SpeciesArrays {
  if (req.initial) {
    return { A: resamplePeriodic(req.initial.A, req.nx), B: resamplePeriodic(req.initial.B, req.nx) };
  }
  const start = options.start;
  switch (start.type) {
    case 'cosine':
      return cosineStart(chain, req.system.chiN, req.nx, req.periods, start.amplitude);
    case 'rpa':
      return rpaStart(chain, req.system.chiN, req.nx, req.periods);
    case 'file':
      throw new ModelError('solver.start', start, 'a file start must be loaded by the caller and passed as initial fields');
  }
}

/** The verdict on converged densities: a one-species melt, or lamellar unless φ_A is flat. */
function phaseOf(chain: Chain, phi: SpeciesArrays): Phase {
  if (chain.species.length === 1) return 'homogeneous-melt';
  return spreadOf(phi.A) < DISORDER_AMPLITUDE ? 'disordered' : 'lamellar';
}

/** Number of A-rich domains: upward crossings of φ_A through its mean on the periodic grid. */
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

interface CellContext {
  req: Pick<FixedCellRequest, 'system' | 'length' | 'periods' | 'nx' | 'keepPropagators'>;
  chain: Chain;
  contour: ReturnType<typeof contourGrid>;
  cell: { length: number; nx: number };
  fixed: SpeciesArrays | undefined;
  t0: number;
  notes: string[];
}

/** The solution record of fields w and the densities they give (F from physics/scft-equations.ts). */
function cellSolution(c: CellContext, w: SpeciesArrays, dens: ReturnType<PropagatorSolver['solve']>, iterations: number, residual: number, converged: boolean, phase: Phase): ScftSolution {
  const { req, chain, contour, cell, fixed } = c;
  const chiN = req.system.chiN;
  const F = fixed ? -Math.log(dens.Q) : freeEnergy(chiN, dens.Q, w, dens.phi);
  const ns = contour.ns;
  const s = new Float64Array(ns + 1).map((_, i) => i / ns);
  return {
    solver: 'spectral',
    system: req.system,
    length: req.length,
    periods: req.periods,
    period: req.length / req.periods,
    nx: req.nx,
    ns,
    x: gridPoints(cell),
    phi: dens.phi,
    w,
    Q: dens.Q,
    QDagger: dens.QDagger,
    freeEnergy: F,
    freeEnergyDisordered: fixed ? Number.NaN : disorderedFreeEnergy(chain, chiN),
    phase,
    amplitude: spreadOf(dens.phi.A),
    iterations,
    residual,
    converged,
    seconds: (performance.now() - c.t0) / 1000,
    propagators: req.keepPropagators ? { s, q: dens.q.map((a) => Float64Array.from(a)), qDagger: dens.qDagger.map((a) => Float64Array.from(a)) } : undefined,
    notes: c.notes,
  };
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
  const cell = { length: req.length, nx: req.nx };
  checkCell(cell);
  if (req.fields.A.length !== req.nx || req.fields.B.length !== req.nx) throw new RangeError(`solveInFields: fields have ${req.fields.A.length} points, the cell ${req.nx}`);
  const contour = contourGrid(chain, req.ns);
  const solver = new PropagatorSolver(chain, cell, contour, { richardson: options.richardson });
  solver.setFields(req.fields);
  const dens = solver.solve();
  const { residual } = fieldDeviation(chain, req.system.chiN, req.fields, dens.phi);
  const phase = phaseOf(chain, dens.phi);
  const notes = ['densities from one propagator solve in the given fields (no SCFT iteration)'];
  return cellSolution({ req, chain, contour, cell, fixed: undefined, t0, notes }, req.fields, dens, 0, residual, residual < options.tolerance, phase);
}

export function solveFixedCell(req: FixedCellRequest): ScftSolution {
  const t0 = performance.now();
  const options = defaultSpectralOptions(req.options);
  const chain = buildChain(req.system.chain);
  const cell = { length: req.length, nx: req.nx };
  checkCell(cell);
  const contour = contourGrid(chain, req.ns);
  const solver = new PropagatorSolver(chain, cell, contour, { richardson: options.richardson });
  const chiN = req.system.chiN;
  const notes: string[] = [];
  const fixed = externalFields(req.system, cell);

  if (fixed) {
    solver.setFields(fixed);
    const dens = solver.solve();
    notes.push('single-chain problem in prescribed fields: no self-consistency; F = −ln Q');
    return cellSolution({ req, chain, contour, cell, fixed, t0, notes }, fixed, dens, 0, 0, true, 'single-chain');
  }

  const first = iterateFields(initialFields(req, chain, options), req.initial ? 0 : options.simpleSteps);
  if (first.phase !== 'disordered' || !first.converged || chain.species.length === 1) return first;
  // Above the cell's own spinodal the homogeneous state is linearly unstable (Leibler's RPA:
  // N/S(q) < 0 at the cell's lamellar wave number q = 2πp/L), so a collapse onto it is the
  // mixing scheme landing on an unstable fixed point, not the answer: restart from smaller,
  // RPA-sized starts before reporting disorder. (Seen: χN = 16, L = 3.75 Rg from the default
  // cosine start, while the lamella there has F 0.44 kT below the disordered state.)
  const q = (2 * Math.PI * req.periods) / req.length;
  if (!(inverseStructureFactor(chain, chiN, q * q) < 0)) return first;
  const restarts: [string, SpeciesArrays][] = [
    ['the RPA start', rpaStart(chain, chiN, req.nx, req.periods)],
    ['a cosine start of amplitude 0.1', cosineStart(chain, chiN, req.nx, req.periods, 0.1)],
  ];
  for (const [name, w0] of restarts) {
    const r = iterateFields(w0, options.simpleSteps);
    if (r.converged && r.phase === 'lamellar') {
      r.notes.unshift(`the first start collapsed to the disordered state (${first.iterations} iterations), which is linearly unstable in this cell (RPA N/S(q) < 0 at q = 2πp/L); ${name} converged to the lamella`);
      return r;
    }
  }
  first.notes.push('the disordered state is linearly unstable in this cell (RPA N/S(q) < 0 at q = 2πp/L), but no restart reached a lamella');
  return first;

  /** The field iteration from w0: simple mixing for `simpleSteps` steps, then Anderson mixing. */
  function iterateFields(w0: SpeciesArrays, simpleSteps: number): ScftSolution {
    const notes: string[] = [];
    const finish = (w: SpeciesArrays, dens: ReturnType<PropagatorSolver['solve']>, iterations: number, residual: number, converged: boolean, phase: Phase): ScftSolution =>
      cellSolution({ req, chain, contour, cell, fixed, t0, notes }, w, dens, iterations, residual, converged, phase);
    let w = w0;
    fixGauge(chain, w);
    const mixer = new AndersonMixer(options.andersonHistory, options.andersonMixing);
    const species = chain.species;
    const pack = (u: SpeciesArrays) => {
      const v = new Float64Array(species.length * req.nx);
      species.forEach((k, i) => v.set(u[k], i * req.nx));
      return v;
    };
    const unpack = (v: Float64Array): SpeciesArrays => {
      const u = zeroFields(req.nx);
      species.forEach((k, i) => u[k].set(v.subarray(i * req.nx, (i + 1) * req.nx)));
      return u;
    };
    let residual = Infinity;
    for (let it = 1; it <= options.maxIterations; it++) {
      solver.setFields(w);
      const dens = solver.solve();
      const upd = fieldDeviation(chain, chiN, w, dens.phi);
      residual = upd.residual;
      if (!Number.isFinite(residual) || !(dens.Q > 0)) {
        notes.push(`iteration diverged at step ${it} (residual ${residual}, Q ${dens.Q}); try smaller andersonMixing or more simpleSteps`);
        return finish(w, dens, it, residual, false, 'lamellar');
      }
      if (residual < options.tolerance) {
        const phase = phaseOf(chain, dens.phi);
        if (phase === 'disordered') notes.push('the iteration collapsed to the homogeneous (disordered) state: no lamella at these parameters from this start');
        if (phase === 'lamellar') {
          const domains = countDomains(dens.phi.A);
          if (domains !== req.periods) notes.push(`cell set up for ${req.periods} period(s) but the solution has ${domains} A domain(s)`);
        }
        return finish(w, dens, it, residual, true, phase);
      }
      if (it === options.maxIterations) {
        notes.push(`not converged after ${it} iterations (residual ${residual.toExponential(3)} > tolerance ${options.tolerance})`);
        return finish(w, dens, it, residual, false, spreadOf(dens.phi.A) < DISORDER_AMPLITUDE ? 'disordered' : 'lamellar');
      }
      let next: SpeciesArrays;
      if (it <= simpleSteps || options.andersonHistory === 0) {
        next = zeroFields(req.nx);
        const mix = it <= simpleSteps ? options.simpleMixing : options.andersonMixing;
        for (const k of species) for (let j = 0; j < req.nx; j++) next[k][j] = w[k][j] + mix * upd.deviation[k][j];
      } else {
        next = unpack(mixer.next(pack(w), pack(upd.deviation)));
      }
      fixGauge(chain, next);
      w = next;
    }
    throw new Error('unreachable');
  }
}
