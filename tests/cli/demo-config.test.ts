import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DEMO_TRAIN_CONFIG } from '../../src/cli/commands/demo.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';

// The demo trains the shipped symmetric example's recipe: its config is written out in the
// demo command (so the demo runs from any folder), and this holds the two equal after both go
// through the schema's defaults (a recipe changed in one place only would make the demo's
// figures and the README's train example disagree).
describe('demo train config', () => {
  it('is the shipped configs/diblock-symmetric-chiN15.train.json', () => {
    const shipped = JSON.parse(readFileSync(new URL('../../configs/diblock-symmetric-chiN15.train.json', import.meta.url), 'utf8'));
    expect(trainConfigSchema.parse(DEMO_TRAIN_CONFIG)).toEqual(trainConfigSchema.parse(shipped));
  });
});
