/**
 * The one place that finds a python with torch for the PyTorch twins of the bench
 * (bench/pytorch/*.py): MESOFIELD_PYTHON if set, then python3, then /usr/bin/python3
 * (Debian's python3-torch lives in the system python, which a pyenv shim may hide). torch is
 * optional: without it the twins are skipped with the reason.
 */
import { spawnSync } from 'node:child_process';

/** Environment that holds every thread pool torch may use (its own, OpenMP, OpenBLAS, MKL) to `threads`. */
export function torchThreadEnv(threads: number): NodeJS.ProcessEnv {
  const n = String(threads);
  return { ...process.env, OMP_NUM_THREADS: n, OPENBLAS_NUM_THREADS: n, MKL_NUM_THREADS: n };
}

/** The candidates in the order they are tried. */
export function pythonCandidates(): string[] {
  return [process.env.MESOFIELD_PYTHON, 'python3', '/usr/bin/python3'].filter((p): p is string => Boolean(p));
}

/** The first candidate that imports torch, or why none did (the last failure). */
export function findTorchPython(): { python: string } | { reason: string } {
  let last = 'no python candidate';
  for (const python of pythonCandidates()) {
    const r = spawnSync(python, ['-c', 'import torch'], { encoding: 'utf8', env: torchThreadEnv(1) });
    if (r.status === 0) return { python };
    last = `${python}: ${(r.stderr || r.error?.message || `exit ${r.status}`).trim().split('\n').pop()}`;
  }
  return { reason: last };
}
