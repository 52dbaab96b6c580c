/** `npm run bench`: prints timings of every part; never fails on a time. */
import { runSpectralBench } from './spectral-bench.js';

runSpectralBench();
