/**
 * The tfjs module type and its tensor types, as types only: every file of the engine and
 * of the layers above names tfjs through here, so that importing a module never loads tfjs
 * (autodiff/backend.ts loads it at run time).
 */
import type * as TfModule from '@tensorflow/tfjs';

export type Tf = typeof TfModule;
export type Tensor = TfModule.Tensor;
