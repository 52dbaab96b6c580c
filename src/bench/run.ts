/** `npm run bench`: prints timings of every part; never fails on a time. */
import { runSpectralBench } from './spectral-bench.js';

runSpectralBench();
const { runTrainerBench } = await import('./trainer-bench.js');
await runTrainerBench();
const inverse = await import('./inverse-bench.js').catch(() => undefined);
if (inverse) await inverse.runInverseBench();
