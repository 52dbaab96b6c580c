// The WebAssembly JS API as far as src/autodiff/wasm uses it (lib ES2022 has no WebAssembly
// types without the DOM library, and @types/node 20 does not declare them).
declare namespace WebAssembly {
  class Memory {
    readonly buffer: ArrayBuffer;
  }
  class Module {
    constructor(bytes: Uint8Array);
  }
  class Instance {
    constructor(module: Module, imports: Record<string, Record<string, unknown>>);
    readonly exports: Record<string, unknown>;
  }
}
