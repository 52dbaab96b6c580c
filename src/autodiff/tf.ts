/**
 * The type of the tfjs module, as a type only: the engine and the layers above name tfjs
 * through here, so that importing a module never loads tfjs (autodiff/backend.ts loads it
 * at run time), and the WASM kernels need not import the backend that installs them.
 */
import type * as TfModule from '@tensorflow/tfjs';

export type Tf = typeof TfModule;
