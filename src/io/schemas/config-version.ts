/** The `version` field of every config kind (what changed since version 1: io/config-renames.ts). */
import { z } from 'zod';
import { CONFIG_VERSION } from '../config-renames.js';

export { CONFIG_KINDS, CONFIG_VERSION, version1Message, version1Renames } from '../config-renames.js';

export const configVersionSchema = z.literal(CONFIG_VERSION, {
  error: `this version of mesofield reads configs of version ${CONFIG_VERSION} (docs/vocabulary.md lists what changed)`,
});
