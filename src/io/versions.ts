/** Provenance stamped into every result and checkpoint: what made it. */
import { readFileSync } from 'node:fs';

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
