/** A config file read as plain JSON, for commands that apply flags on top before validating. */
import { readJsonObject } from '../io/load-json.js';

export function readRawConfig(path: string): Record<string, unknown> {
  return readJsonObject(path);
}

/** The object at parent[key], created empty when missing or not an object. */
export function obj(parent: Record<string, unknown>, key: string): Record<string, unknown> {
  const v = parent[key];
  if (v && typeof v === 'object' && !Array.isArray(v)) return v as Record<string, unknown>;
  const fresh: Record<string, unknown> = {};
  parent[key] = fresh;
  return fresh;
}
