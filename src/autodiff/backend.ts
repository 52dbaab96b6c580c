/**
 * Run-time choice of the TensorFlow.js backend for the neural solver.
 *
 *   native — @tensorflow/tfjs-node (libtensorflow; an optional dependency, often absent)
 *   wasm   — @tensorflow/tfjs + @tensorflow/tfjs-backend-wasm, one thread
 *   cpu    — @tensorflow/tfjs plain JavaScript kernels
 *   auto   — the first of native, wasm, cpu that initialises
 *
 * Every backend computes in float32. tfjs is imported lazily, inside selectBackend, so that
 * commands which never train (spectral solves, reports) never load it; import only types
 * from '@tensorflow/tfjs' elsewhere at module level.
 *
 * The WASM binaries are loaded from the package's own dist folder: in Node the default
 * (a URL relative to the page) cannot be fetched, so setWasmPaths is given the folder
 * resolved by Node's module resolution.
 */
import { createRequire } from 'node:module';
import path from 'node:path';
import type { Tf } from './tf.js';
import { installWasmKernels } from './wasm/kernels.js';

export type { Tf } from './tf.js';
export type BackendKind = 'auto' | 'native' | 'wasm' | 'cpu';
export type BackendName = 'native' | 'wasm' | 'cpu';

export interface BackendHandle {
  tf: Tf;
  backend: BackendName;
  tfjsVersion: string;
}

export class BackendError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BackendError';
  }
}

/**
 * tfjs's packages are CommonJS. Loaded with require, not import(): Node's import() of a
 * CommonJS file first scans its whole source (and each file it re-exports) for export names,
 * which for tfjs's bundles cost 0.6 s of CPU in every process that trains (measured: 0.25 s
 * CPU to load @tensorflow/tfjs and the wasm backend by require, 0.88 s by import()). Same
 * modules, same instances: both paths share Node's CommonJS module cache.
 */
const requireCommonJs = createRequire(import.meta.url);

/** tfjs registers each backend once per process; the promise per backend is kept here. */
const initialised = new Map<BackendName, Promise<BackendHandle>>();

function message(err: unknown): string {
  return err instanceof Error ? err.message.split('\n')[0] : String(err);
}

/**
 * The tfjs "install the node backend" banner and other tfjs warnings go through its log
 * helper, which is silent in PROD mode; a command-line tool should not print them
 * between its own lines. PROD changes no arithmetic.
 */
function quiet(tf: Tf): void {
  tf.env().set('PROD', true);
}

async function initNative(): Promise<BackendHandle> {
  // A variable specifier keeps TypeScript (and bundlers) from resolving the optional
  // package at build time; it is not installed on every machine.
  const spec = '@tensorflow/tfjs-node';
  let tf: Tf;
  try {
    tf = requireCommonJs(spec) as Tf;
  } catch (err) {
    throw new BackendError(
      `backend "native" needs the optional package @tensorflow/tfjs-node (4.22.0), which could not be loaded: ${message(err)}. ` +
        `Install it (npm install @tensorflow/tfjs-node@4.22.0) or choose backend "wasm" or "cpu".`,
    );
  }
  if (!(await tf.setBackend('tensorflow'))) throw new BackendError('backend "native": @tensorflow/tfjs-node loaded but its "tensorflow" backend did not initialise');
  await tf.ready();
  quiet(tf);
  return { tf, backend: 'native', tfjsVersion: tf.version.tfjs };
}

async function initWasm(): Promise<BackendHandle> {
  const tf = requireCommonJs('@tensorflow/tfjs') as Tf;
  const wasm = requireCommonJs('@tensorflow/tfjs-backend-wasm') as typeof import('@tensorflow/tfjs-backend-wasm');
  // require.resolve gives .../tfjs-backend-wasm/dist/index.js; the .wasm files sit beside it.
  const dist = path.dirname(requireCommonJs.resolve('@tensorflow/tfjs-backend-wasm'));
  wasm.setWasmPaths(dist + path.sep);
  // One thread: the machine is shared, and the threaded binary needs cross-origin isolation
  // that Node does not provide.
  wasm.setThreadsCount(1);
  let ok: boolean;
  try {
    ok = await tf.setBackend('wasm');
  } catch (err) {
    throw new BackendError(`backend "wasm" did not initialise (binaries looked up in ${dist}): ${message(err)}`);
  }
  if (!ok) throw new BackendError(`backend "wasm" did not initialise (binaries looked up in ${dist})`);
  await tf.ready();
  quiet(tf);
  // Our kernels (wasm/kernels.ts), or a warning and tfjs's own kernels.
  const warning = await installWasmKernels(tf, { core: tf.version['tfjs-core'], wasmBackend: wasm.version_wasm });
  if (warning) process.emitWarning(warning);
  return { tf, backend: 'wasm', tfjsVersion: tf.version.tfjs };
}

async function initCpu(): Promise<BackendHandle> {
  const tf = requireCommonJs('@tensorflow/tfjs') as Tf;
  if (!(await tf.setBackend('cpu'))) throw new BackendError('backend "cpu" did not initialise');
  await tf.ready();
  quiet(tf);
  return { tf, backend: 'cpu', tfjsVersion: tf.version.tfjs };
}

const INIT: Record<BackendName, () => Promise<BackendHandle>> = { native: initNative, wasm: initWasm, cpu: initCpu };

async function activate(name: BackendName): Promise<BackendHandle> {
  let p = initialised.get(name);
  if (!p) {
    p = INIT[name]();
    initialised.set(name, p);
    // A failed start is not cached: a later call reports the failure again instead of a stale promise.
    p.catch(() => initialised.delete(name));
    return p;
  }
  const handle = await p;
  // Already initialised: make it the active one again (tests switch between backends).
  const tfName = name === 'native' ? 'tensorflow' : name;
  if (handle.tf.getBackend() !== tfName) await handle.tf.setBackend(tfName);
  return handle;
}

/**
 * Initialise (once) and activate the requested backend. Under 'auto' the failures of the
 * faster backends are collected in `skipped` so the caller can say why it runs slower.
 */
export async function selectBackend(kind: BackendKind = 'auto'): Promise<BackendHandle & { skipped: string[] }> {
  if (kind !== 'auto') return { ...(await activate(kind)), skipped: [] };
  const skipped: string[] = [];
  for (const name of ['native', 'wasm', 'cpu'] as const) {
    try {
      return { ...(await activate(name)), skipped };
    } catch (err) {
      skipped.push(`${name}: ${message(err)}`);
    }
  }
  throw new BackendError(`no tfjs backend initialised: ${skipped.join('; ')}`);
}
