// The part of the WebAssembly JavaScript API (https://webassembly.github.io/spec/js-api/)
// that the solver uses. Node provides the global; the ES lib of TypeScript does not declare
// it (it lives in the DOM lib, which this project does not load).
declare namespace WebAssembly {
  class Module {
    constructor(bytes: Uint8Array);
  }
  type Exports = Record<string, unknown>;
  class Instance {
    constructor(module: Module, imports?: Record<string, Record<string, unknown>>);
    readonly exports: Exports;
  }
  interface MemoryDescriptor {
    initial: number;
    maximum?: number;
    shared?: boolean;
  }
  class Memory {
    constructor(descriptor: MemoryDescriptor);
    readonly buffer: ArrayBuffer | SharedArrayBuffer;
    grow(pages: number): number;
  }
  class Global {
    value: number;
  }
}
