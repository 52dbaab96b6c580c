/**
 * What each report section needs, as small typed objects. A section renders when its
 * input is present and is left out otherwise, so one report kind serves solve, train,
 * evaluate and invert runs: the run loader (load-run.ts) fills in what the directory holds.
 *
 * Units follow docs/physics.md: x and periods in Rg, fields and free energies in kT per chain.
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import type { ScftSolution } from '../physics/result.js';
import type { ScatteringReportInput } from './scattering-input.js';
import type { BraggReportInput } from './bragg-input.js';
import type { TerracePrediction, ThicknessPoint } from '../spectral/thickness-scan.js';
import type { BraggFitFile, SpacingFitFile } from '../io/formats/measurement-fits.js';

/** The title block: what was run, with what, when (from the run's provenance) and how long. */
export interface RunInfo {
  /** 'solve' | 'train' | 'evaluate' | 'invert', or any later run kind. */
  kind: string;
  /** The run directory as given by the user (printed, not read again). */
  source: string;
  system: SystemSpec;
  /** Lamellar period in Rg (NaN when there is none, e.g. disordered). */
  period: number;
  /** Rg in nm, when the user gives it: the period is then also printed in nm. */
  rgNm?: number;
  /** The settings as run, one row per setting (the appendix's compact table). */
  settings: SettingRow[];
  provenance: { version: string; node: string; createdAt: string; backend?: string; tfjs?: string; [k: string]: unknown };
  /** Wall time of the run in seconds, and what it covers. */
  runSeconds?: number;
  runSecondsNote?: string;
}

/** Density and field profiles: the reference, and optionally a network solution on the same grid. */
export interface ProfileInput {
  reference: ScftSolution;
  network?: ScftSolution;
  /** Legend name of the network curve (default "network"). */
  networkLabel?: string;
  /** Rg in nm when the run's data were in nm: x is then drawn in nm with Rg on a top axis. */
  rgNm?: number;
}

/** q(x, s) heat maps: needs `propagators` on the reference (and on the network, if given). */
export interface PropagatorInput {
  reference: ScftSolution;
  network?: ScftSolution;
  networkLabel?: string;
}

export interface PeriodTracePoint {
  period: number;
  freeEnergy: number;
  phase: string;
  iterations: number;
}

/** F(L) from an equilibrium-period search, with the chosen period. */
export interface PeriodSearchInput {
  trace: PeriodTracePoint[];
  period: number;
  periodTolerance?: number;
}

export interface SettingRow {
  name: string;
  value: string;
}

/** One optimiser iteration of a training run, on one axis over every phase. */
export interface TrainingRecord {
  /** 'warm start', 'Adam', 'L-BFGS', 'second order', … in the order the run went through them. */
  phase: string;
  /** Iterations over all phases so far (warm-start steps, then Adam steps, then L-BFGS iterations, …). */
  iteration: number;
  /** Seconds since the run started (reference solve included), when the run recorded it. */
  wallSeconds?: number;
  /** The loss the phase minimises (> 0); phases minimise different objectives. */
  loss: number;
  /** φA relative L2 error against the reference, where measured. */
  referenceError?: number;
}

export interface TrainingPhase {
  name: string;
  /** First and last iteration of the phase on the all-phase axis. */
  from: number;
  to: number;
  iterations: number;
  /** Wall time at the phase's first and last record, s. */
  wallFrom?: number;
  wallTo?: number;
  finalLoss: number;
  finalReferenceError?: number;
}

/** Training curves; inverse runs add the trajectory of the trainable χN. */
export interface TrainingInput {
  records: TrainingRecord[];
  phases: TrainingPhase[];
  /** False when the run recorded training seconds only (older runs): the time axis then starts at the Adam phase. */
  wallClock: boolean;
  chiNTrajectory?: { step: number; chiN: number }[];
  /** A reference χN (true or estimated) drawn as a line against the trajectory. */
  chiNReference?: { value: number; label: string };
}

export interface DataPoint {
  x: number;
  value: number;
  /** One standard deviation of the measurement; > 0. */
  sigma: number;
}

export interface EstimatorRow {
  name: string;
  chiN: number;
  lower?: number;
  upper?: number;
  note?: string;
}

/** χN inversion from a measured profile. */
export interface InversionInput {
  /** What was measured, e.g. "φA"; used in axis labels. */
  quantity: string;
  data: DataPoint[];
  /** The profile of the best fit, on a fine x grid. */
  fitted: { x: number; value: number }[];
  /** Residuals at the data points, (data − fit) / σ. */
  residuals: { x: number; normalized: number }[];
  /** Δχ²(χN) = χ²(χN) − min χ², minimised over the other parameters at each χN. */
  profileLikelihood: { chiN: number; deltaChi2: number }[];
  /** The confidence interval read from the profile, with the Δχ² threshold that defines it. */
  interval: { lower: number; upper: number; level: number; threshold: number };
  /** The wider (95 %) interval, when the run computed it. */
  interval95?: { lower: number; upper: number; threshold: number };
  /** Units of x as the data gave them; with nm, Rg in nm for the second (Rg) axis. */
  xUnit?: 'Rg' | 'nm';
  rgNm?: number;
  /** Fit quality and fitted nuisance parameters (reduced χ², period, offset), for the metrics table. */
  fitRows?: MetricRow[];
  /** What the χN rests on: the assumed inputs, how each entered and its effect on χN (title page). */
  restsOn?: string[];
  bestChiN: number;
  estimators: EstimatorRow[];
}

/** A film fit (inverse/film/film-fit-run.ts): the data against the model, and the profile likelihoods. */
export interface FilmFitInput {
  dataKind: 'phi' | 'sld' | 'reflectivity';
  /** Axis label of x, with its unit (depth in nm or Rg, or Q in Å⁻¹). */
  xLabel: string;
  /** Axis label of the measured quantity, with its unit. */
  yLabel: string;
  data: { x: number; value: number; sigma: number; fit: number }[];
  /** Best-fit values and the 95 % intervals of the parameters that have one. */
  parameters: { name: string; value: number; lower?: number; upper?: number; unit: string }[];
  /** Δχ² against each interval parameter, minimised over the others. */
  profiles: { name: string; points: { value: number; deltaChi2: number }[]; threshold: number }[];
  layers: string;
  reducedChi2: number;
  warnings: string[];
}

/** A surrogate over a parameter range: its error map at held-out points, period model and training rounds. */
export interface SurrogateInput {
  /** The varying parameters in order (1 to 3), with the trained range and anchor count. */
  parameters: { name: string; symbol: string; min: number; max: number; anchors: number }[];
  /** Equilibrium period (Rg) at each anchor, with its varying-parameter values. */
  anchors: { values: number[]; period: number }[];
  /** The surrogate's period L(θ) (Rg) at varying-parameter values (the interpolation of the anchors). */
  periodAt: (values: number[]) => number;
  heldOut: {
    values: number[];
    phiARelativeL2: number;
    /** F_surrogate − F_reference, kT per chain. */
    freeEnergyError: number;
    /** Reference (equilibrium) period and the surrogate's relative period error. */
    referencePeriod: number;
    periodRelativeError: number;
    /** φA relative L2 of the anchors' reference profiles interpolated to the point (no network). */
    anchorInterpolationPhiA: number;
  }[];
  /** Held-out points of the anchor-cell centres (the first cellCentres of heldOut), for the 2D map. */
  cellCentres: number;
  /** Training rounds: round 0 is the fit to reference data. */
  history: { round: number; residual: number | null; fitLoss: number; phiError?: number }[];
  /** Lines of timing text (query against reference solve, build time). */
  timing: string[];
  /** Wall time that built the surrogate, s. */
  buildSeconds: number;
}

/** A network's errors against the reference (from a train run's metrics). */
export interface NetworkMetricsInput {
  phiA: { relativeL2: number; maxError: number };
  exchangeField: { relativeL2: number; maxError: number };
  QRelativeError: number;
  freeEnergyError: number;
  /** Mean squared residual of each loss term at fresh random points (only the non-zero ones). */
  freshResiduals: Record<string, number>;
  /** The network density's phase verdict. */
  phase: string;
  /** Largest |φA + φB − 1| of the network's densities on the evaluation grid, when the run recorded it. */
  incompressibilityMax?: number;
  /** How the network solution was evaluated (its notes: the φ quadrature, how Q and F were formed). */
  notes?: string[];
}

/** One point of a parameter sweep (sweep table file): lengths in Rg, F in kT per chain. */
export interface SweepPointInput {
  chiN: number;
  f: number;
  segmentRatio: number;
  phase: string;
  period: number | null;
  freeEnergy: number | null;
  freeEnergyDisordered: number | null;
  Q: number | null;
  converged: boolean;
  /** RPA spinodal (χN)_s of the disordered melt for this point's chain (Leibler 1980). */
  spinodalChiN: number;
}

export interface SweepInput {
  points: SweepPointInput[];
  chainLabel: string;
  /** A sweep with a thickness axis: its F(H) curves (then drawn instead of the χN figures). */
  film?: FilmSweepInput;
}

/** One F(H) of a film sweep (fixed χN, f, b_A/b_B and walls) with the bulk period D for reference. */
export interface FilmSweepScanInput extends ThicknessScanInput {
  /** Each point also with F of the disordered film between the same walls (kT per chain). */
  points: ThicknessPoint[];
  chiN: number;
  f: number;
  segmentRatio: number;
  walls: { bottom: number; top: number };
  terraces?: TerracePrediction;
  /** Stress-free period of the bulk lamella at the same χN, f, b_A/b_B (Rg); NaN when there is none. */
  bulkPeriod: number;
  bulkNote?: string;
}

export interface FilmSweepInput {
  scans: FilmSweepScanInput[];
  /** Grid of the bulk-period solves (points per period × contour steps). */
  bulkGrid: { nx: number; ns: number };
}

/** F(H) of a film: a thickness scan (spectral/thickness-scan.ts). */
export interface ThicknessScanInput {
  points: { thickness: number; freeEnergy: number; freeEnergyPerArea: number; phase: string; layers: string; converged: boolean }[];
  minima: { thickness: number; freeEnergy: number; layers: string }[];
  stable: number[];
}

/**
 * Specular reflectivity against data, for a film: the hook a reflectivity fit fills
 * ({q, r, dr?} measured, model R at the same q). qUnit names Q's unit (e.g. "1/Å").
 */
export interface ReflectivityInput {
  q: number[];
  r: number[];
  dr?: number[];
  model: number[];
  qUnit: string;
  label?: string;
}

/** A film between walls: the solution's walls, thickness and layers, and F(H) when scanned. */
export interface FilmInput {
  /** The reference (spectral) film solution, or the only solution of the run. */
  solution: ScftSolution;
  /** A network solution of the same film on the same grid (a train or evaluate run): drawn beside the reference. */
  network?: ScftSolution;
  thickness: number;
  walls: { bottom: number; top: number; range: number };
  layers: { A: number; B: number; sequence: string };
  freeEnergyPerArea?: number;
  scan?: ThicknessScanInput;
  reflectivity?: ReflectivityInput;
}

export interface MetricRow {
  name: string;
  value: string;
  unit?: string;
}

/** Everything a report can show. Add a field here for a new section's input. */
export interface ReportInput {
  info: RunInfo;
  profiles?: ProfileInput;
  propagators?: PropagatorInput;
  periodSearch?: PeriodSearchInput;
  training?: TrainingInput;
  inversion?: InversionInput;
  filmFit?: FilmFitInput;
  surrogate?: SurrogateInput;
  networkMetrics?: NetworkMetricsInput;
  sweep?: SweepInput;
  film?: FilmInput;
  /** Disordered-melt scattering fits (fit-scattering). */
  scattering?: ScatteringReportInput;
  /** A predicted Bragg pattern (bragg-pattern). */
  bragg?: BraggReportInput;
  /** A fit to measured Bragg peaks (fit-bragg). */
  braggFit?: BraggFitFile;
  /** A fit to the domain spacings of several N (fit-spacing). */
  spacingFit?: SpacingFitFile;
  /** Rows appended to the metrics table (e.g. from metrics.json). */
  metrics?: MetricRow[];
}
