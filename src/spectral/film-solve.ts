/**
 * A film between walls (physics/cell/film-cell.ts): its ordered state, its disordered state
 * with the same walls, the verdict between them and the layers.
 *
 * Units: z and H in Rg, F in kT per chain, F per area in kT ρ₀Rg/N (docs/physics.md, "Films").
 * Near a preferential wall even the disordered melt is not uniform, so the film's disordered
 * reference is solved, not taken from the bulk χN f(1 − f): the iteration from a uniform
 * composition (fields from self-consistency with the walls' surface field) converges to the
 * disordered film, whose composition varies only near the walls; it is solved by Newton's
 * method (newton-solve.ts), which converges to it even where it is unstable (a mixing
 * iteration leaves it along its unstable modes). The ordered state is
 * the best of lamellar starts with the number of half-periods that fits H (cell.startPattern)
 * and its neighbours of the parity the walls allow. The lower free energy wins; "disordered"
 * when no ordered start ends below the disordered film.
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import type { FilmCell } from '../physics/cell/film-cell.js';
import type { Contour } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { fieldsFromComposition } from '../physics/scft-equations.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { bulkPeriodGuess, contourOf, solveFixedCell } from './scft-solver.js';
import { solveByNewton } from './newton-solve.js';

export interface FilmLayers {
  /** A-rich layers (runs of φ_A > φ_B along z) and B-rich layers, from the bottom wall up. */
  A: number;
  B: number;
  /** 'A' or 'B' for each layer, bottom first. */
  sequence: string;
}

export interface FilmSolve {
  /** The film's state (lowest F); its freeEnergyDisordered is the disordered film's F. */
  solution: ScftSolution;
  /** The disordered film with the same walls. */
  disordered: ScftSolution;
  layers: FilmLayers;
  /** F·⟨φ₀⟩·H: free energy per unit area, kT ρ₀Rg/N. */
  freeEnergyPerArea: number;
  /** Every start tried: its half-periods m (0: the uniform start), F and whether it converged. */
  starts: { halfPeriods: number; freeEnergy: number; converged: boolean; phase: string }[];
}

export interface FilmRequest {
  system: SystemSpec;
  cell: FilmCell;
  contour: number | Contour;
  options?: Partial<SpectralOptions>;
  /** Fields of an earlier film solution to try as one more start (a thickness scan's neighbour). */
  initial?: SpeciesArrays;
  keepPropagators?: boolean;
}

/** Layers: runs of the sign of φ_A − φ_B along z. */
export function countLayers(phi: SpeciesArrays): FilmLayers {
  let sequence = '';
  for (let j = 0; j < phi.A.length; j++) {
    const k = phi.A[j] >= phi.B[j] ? 'A' : 'B';
    if (sequence[sequence.length - 1] !== k) sequence += k;
  }
  return { A: [...sequence].filter((c) => c === 'A').length, B: [...sequence].filter((c) => c === 'B').length, sequence };
}

function lamellarStart(chain: Chain, chiN: number, cell: FilmCell, halfPeriods: number, sign: number, amplitude = 0.3): SpeciesArrays {
  const f = chain.speciesFraction.A;
  const a = Math.min(amplitude, 0.95 * Math.min(f, 1 - f));
  const k = (Math.PI * halfPeriods) / cell.length;
  const total = cell.totalDensity;
  const phiA = Float64Array.from(cell.x, (z, j) => (f + a * sign * Math.cos(k * z)) * (total ? total[j] : 1));
  return fieldsFromComposition(chain, Math.max(chiN, 1), phiA, cell);
}

export function solveFilm(req: FilmRequest): FilmSolve {
  const chain = buildChain(req.system.chain);
  const contour = contourOf(chain, req.contour);
  const chiN = req.system.chiN;
  const cell = req.cell;
  const solve = (initial: SpeciesArrays) => solveFixedCell({ ...req, contour, initial });
  const f = chain.speciesFraction.A;
  const uniform = fieldsFromComposition(chain, chiN, Float64Array.from(cell.x, (_, j) => f * (cell.totalDensity ? cell.totalDensity[j] : 1)), cell);
  const disordered = solveByNewton({ ...req, contour, start: uniform });
  const starts: FilmSolve['starts'] = [{ halfPeriods: 0, freeEnergy: disordered.freeEnergy, converged: disordered.converged, phase: 'disordered' }];
  const candidates: ScftSolution[] = [];
  if (chain.species.length === 2 && !req.system.externalField) {
    const base = cell.startPattern(bulkPeriodGuess(chain, chiN));
    const m0 = Math.round((base.waveNumber * cell.length) / Math.PI);
    const sign = Math.sign(base.pattern[0]) || 1;
    const fixedParity = cell.walls.bottom.affinity !== 0 && cell.walls.top.affinity !== 0;
    const step = fixedParity ? 2 : 1;
    for (const m of [m0, m0 + step, m0 - step].filter((v) => v >= 1)) {
      const sol = solve(lamellarStart(chain, chiN, cell, m, sign));
      starts.push({ halfPeriods: m, freeEnergy: sol.freeEnergy, converged: sol.converged, phase: sol.phase });
      if (sol.converged) candidates.push(sol);
    }
    if (req.initial) {
      const sol = solve(req.initial);
      starts.push({ halfPeriods: -1, freeEnergy: sol.freeEnergy, converged: sol.converged, phase: sol.phase });
      if (sol.converged) candidates.push(sol);
    }
  }
  // The ordered state must be a different state from the disordered film and lie below it.
  const distinct = (s: ScftSolution) => {
    let d = 0;
    for (let j = 0; j < s.phi.A.length; j++) d = Math.max(d, Math.abs(s.phi.A[j] - disordered.phi.A[j]));
    return d > 1e-4;
  };
  const ordered = candidates.filter((s) => distinct(s) && s.freeEnergy < disordered.freeEnergy).sort((a, b) => a.freeEnergy - b.freeEnergy)[0];
  const fDis = disordered.converged ? disordered.freeEnergy : Number.NaN;
  const chosen = ordered ?? disordered;
  const phase = ordered ? 'lamellar' : chain.species.length === 1 ? 'homogeneous-melt' : req.system.externalField ? 'single-chain' : 'disordered';
  const notes = [...chosen.notes];
  if (!disordered.converged) notes.push('the disordered film (uniform start) did not converge: F_disordered is not available');
  const solution: ScftSolution = { ...chosen, phase, freeEnergyDisordered: fDis, notes };
  const filled = cell.totalDensity ? cell.mean(cell.totalDensity) : 1;
  return {
    solution,
    disordered: { ...disordered, phase: 'disordered', freeEnergyDisordered: fDis },
    layers: countLayers(solution.phi),
    freeEnergyPerArea: solution.freeEnergy * filled * cell.length,
    starts,
  };
}
