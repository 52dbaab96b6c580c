/**
 * `npm run bench`: prints timings of every part; never fails on a time.
 * `npm run bench -- --step-profile`: only the per-step timing and kernel breakdown (issue 7).
 * `npm run bench -- --surrogate`: only the parametric surrogate (issue 6).
 */
const only = process.argv.includes('--step-profile');
const surrogateOnly = process.argv.includes('--surrogate');
if (!surrogateOnly) {
  if (!only) {
    const { runSpectralBench } = await import('./spectral-bench.js');
    runSpectralBench();
  }
  const { runStepProfile } = await import('./step-profile.js');
  await runStepProfile();
  const { runWorkerBench } = await import('./worker-bench.js');
  await runWorkerBench();
  if (!only) {
    const { runTrainerBench } = await import('./trainer-bench.js');
    await runTrainerBench();
    const inverse = await import('./inverse-bench.js').catch(() => undefined);
    if (inverse) await inverse.runInverseBench();
  }
}
if (!only) {
  const { runSurrogateBench } = await import('./surrogate-bench.js');
  await runSurrogateBench();
}
