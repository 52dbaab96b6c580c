/** Provenance stamped into every result and checkpoint: what made it. */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);

function packageVersion(name: string): string | undefined {
  try {
    return (require(`${name}/package.json`) as { version: string }).version;
  } catch {
    return undefined;
  }
}

export function mesofieldVersion(): string {
  const url = new URL('../../package.json', import.meta.url);
  return (JSON.parse(readFileSync(url, 'utf8')) as { version: string }).version;
}

export interface Provenance {
  tool: 'mesofield';
  version: string;
  node: string;
  createdAt: string;
  /** tfjs backend and version, for network runs. */
  backend?: string;
  tfjs?: string;
}

export function provenance(extra: Partial<Provenance> = {}): Provenance {
  return { tool: 'mesofield', version: mesofieldVersion(), node: process.version, createdAt: new Date().toISOString(), ...extra };
}

export function dependencyVersions(): Record<string, string | undefined> {
  return { fft: packageVersion('fft.js'), zod: packageVersion('zod') };
}
