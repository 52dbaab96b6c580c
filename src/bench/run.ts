/**
 * `npm run bench`: prints timings of every part; never fails on a time.
 * One part only: `npm run bench -- --step-profile` (per-step timing and kernel breakdown,
 * side by side with PyTorch; independent runs and one run split across worker threads),
 * `--trainer` (trainer steps, transfer, time to a target error), `--inverse` (both χN
 * estimators, and the network estimator's convergence from a start 10 % low), `--surrogate` (the parametric surrogate), `--startup` (start-up of the command
 * line against bare node), `--recipes` (Adam + L-BFGS against the second-order phase, and the PyTorch twin of Adam + L-BFGS when torch is found, on five
 * systems; only when asked, it is long: see recipe-bench.ts), `--propagator-floor` (the
 * propagator networks alone in the reference's field: the floor of the second-order recipe;
 * only when asked, see propagator-floor.ts), `--lm-profile` (CPU time of the parts of one
 * Levenberg–Marquardt iteration of the second-order phase; only when asked, see lm-profile.ts),
 * `--network-least-squares` (the least-squares network χN estimator end to end; only when
 * asked, see network-least-squares-bench.ts), `--discretisation-floor` (what the recipe's field
 * modes and contour nodes alone cost in φ_A; only when asked, see discretisation-floor.ts),
 * `--film-field-floor` (the same two floors for a film's linear field network; only when asked,
 * see film-field-floor.ts), `--stall-analysis` (where one run's error sits: field or propagators,
 * which block, interface or domain; only when asked, see stall-analysis.ts).
 */
const parts = ['--step-profile', '--trainer', '--inverse', '--surrogate', '--startup', '--recipes', '--propagator-floor', '--lm-profile', '--network-least-squares', '--discretisation-floor', '--film-field-floor', '--stall-analysis'].filter((p) => process.argv.includes(p));
const want = (p: string) => parts.length === 0 || parts.includes(p);

if (parts.length === 0) {
  const { runSpectralBench } = await import('./spectral-bench.js');
  runSpectralBench();
}
if (want('--step-profile')) {
  const { runStepProfile } = await import('./step-profile.js');
  await runStepProfile();
  const { runWorkerBench } = await import('./worker-bench.js');
  await runWorkerBench();
  const { runDataParallelBench } = await import('./data-parallel.js');
  await runDataParallelBench();
}
if (want('--trainer')) {
  const { runTrainerBench } = await import('./trainer-bench.js');
  await runTrainerBench();
}
if (want('--inverse')) {
  const { runInverseBench, runNetworkConvergenceBench } = await import('./inverse-bench.js');
  await runInverseBench();
  await runNetworkConvergenceBench();
}
// Opt-in only: the propagator networks alone in the reference's field (a few minutes).
if (parts.includes('--propagator-floor')) {
  const { runPropagatorFloorBench } = await import('./propagator-floor.js');
  await runPropagatorFloorBench();
}
// Opt-in only: the parts of one LM iteration (a minute).
if (parts.includes('--lm-profile')) {
  const { runLmProfile } = await import('./lm-profile.js');
  await runLmProfile();
}
// Opt-in only: the least-squares network χN estimator end to end (minutes).
if (parts.includes('--network-least-squares')) {
  const { runNetworkLeastSquaresBench } = await import('./network-least-squares-bench.js');
  await runNetworkLeastSquaresBench();
}
// Opt-in only: the spectral solver alone (seconds).
if (parts.includes('--discretisation-floor')) {
  const { runDiscretisationFloor } = await import('./discretisation-floor.js');
  runDiscretisationFloor();
}
// Opt-in only: the spectral solver alone on a film (seconds).
if (parts.includes('--film-field-floor')) {
  const { runFilmFieldFloor } = await import('./film-field-floor.js');
  runFilmFieldFloor();
}
// Opt-in only: one training run of a bench system taken apart (minutes).
if (parts.includes('--stall-analysis')) {
  const { runStallAnalysis } = await import('./stall-analysis.js');
  await runStallAnalysis();
}
// Opt-in only: it trains 2 recipes × 5 systems × 5 seeds (an hour or more here).
if (parts.includes('--recipes')) {
  const { runRecipeBench } = await import('./recipe-bench.js');
  await runRecipeBench();
}
if (want('--surrogate')) {
  const { runSurrogateBench } = await import('./surrogate-bench.js');
  await runSurrogateBench();
}
if (want('--startup')) {
  const { runStartupBench } = await import('./startup-bench.js');
  runStartupBench();
}
