// The compiled WebAssembly site kernel (assembly/*.ts, built by `npm run build` into
// build/siteKernel.mjs, a module that carries the bytes, so no file is read here). When the
// build product is missing the solver runs the JavaScript reference kernel.

export interface KernelModuleStatus {
  module: WebAssembly.Module | null;
  /** why module is null ('' when it is available) */
  reason: string;
}

async function loadKernelModule(): Promise<KernelModuleStatus> {
  if (typeof WebAssembly !== 'object') return { module: null, reason: 'WebAssembly is not available in this runtime' };
  const url = new URL('../../../build/siteKernel.mjs', import.meta.url).href;
  let base64: unknown;
  try {
    base64 = ((await import(url)) as { siteKernelBase64?: unknown }).siteKernelBase64;
  } catch {
    return { module: null, reason: 'the WebAssembly kernel is not built (run `npm run build`)' };
  }
  if (typeof base64 !== 'string') return { module: null, reason: 'build/siteKernel.mjs has no kernel bytes (run `npm run build`)' };
  try {
    const bytes = Uint8Array.from(atob(base64), (ch) => ch.charCodeAt(0));
    return { module: new WebAssembly.Module(bytes), reason: '' };
  } catch (err) {
    return { module: null, reason: `the WebAssembly kernel does not compile here: ${err instanceof Error ? err.message : String(err)}` };
  }
}

/** Loaded once per thread, at import. */
export const kernelModule: KernelModuleStatus = await loadKernelModule();
