/**
 * `npm run bench`: prints timings of every part; never fails on a time.
 * One part only: `npm run bench -- --step-profile` (per-step timing and kernel breakdown,
 * side by side with PyTorch; independent runs and one run split across worker threads),
 * `--trainer` (trainer steps, transfer, time to a target error), `--inverse` (both χN
 * estimators), `--surrogate` (the parametric surrogate), `--startup` (start-up of the command
 * line against bare node).
 */
const parts = ['--step-profile', '--trainer', '--inverse', '--surrogate', '--startup'].filter((p) => process.argv.includes(p));
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
  const { runInverseBench } = await import('./inverse-bench.js');
  await runInverseBench();
}
if (want('--surrogate')) {
  const { runSurrogateBench } = await import('./surrogate-bench.js');
  await runSurrogateBench();
}
if (want('--startup')) {
  const { runStartupBench } = await import('./startup-bench.js');
  runStartupBench();
}
