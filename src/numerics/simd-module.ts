/**
 * Assembles a module written in WebAssembly text with SIMD (wabt, loaded on first use) into a
 * compiled WebAssembly.Module, or null when this Node has no WebAssembly SIMD or the assembler
 * is missing: the float64 kernels' callers then keep their JS forms. MESOFIELD_DEBUG_KERNELS=1
 * prints why a module was not made (a developer's switch, not a user setting).
 */
type Parsed = { validate(): void; toBinary(o: object): { buffer: Uint8Array }; destroy(): void };
type Wabt = { parseWat: (name: string, text: string, features: Record<string, boolean>) => Parsed };

export async function assembleSimdModule(name: string, wat: string): Promise<WebAssembly.Module | null> {
  try {
    // A CommonJS package (`export =`): its function arrives as the default export.
    const mod = (await import('wabt')) as unknown as { default: () => Promise<Wabt> };
    const wabt = await mod.default();
    const parsed = wabt.parseWat(name, wat, { simd: true });
    try {
      parsed.validate();
      return new WebAssembly.Module(parsed.toBinary({}).buffer);
    } finally {
      parsed.destroy();
    }
  } catch (e) {
    if (process.env.MESOFIELD_DEBUG_KERNELS) console.error(e);
    return null;
  }
}
