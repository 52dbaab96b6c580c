#!/usr/bin/env node
/**
 * mesofield command line. A thin layer: each command parses its inputs and calls library
 * functions. Commands that do not train never import tfjs (start-up time matters).
 */
import { Command } from 'commander';
import { mesofieldVersion } from '../io/versions.js';
import { registerDemo } from './commands/demo.js';
import { registerSolve } from './commands/solve.js';
import { registerSchema } from './commands/schema.js';
import { registerSpinodal } from './commands/spinodal.js';
import { registerTrain } from './commands/train.js';
import { registerSynth } from './commands/synth.js';
import { registerInvert } from './commands/invert.js';
import { registerReport } from './commands/report.js';
import { registerSweep } from './commands/sweep.js';
import { registerPredict } from './commands/predict.js';
import { registerReflectivity } from './commands/reflectivity.js';

const program = new Command();
program
  .name('mesofield')
  .description('Physics-informed networks for 1D polymer SCFT, checked against a spectral reference solver')
  .version(mesofieldVersion())
  .showHelpAfterError()
  .configureOutput({ writeErr: (s) => process.stderr.write(s) })
  .exitOverride((err) => {
    // commander's own usage errors (unknown option, missing argument) are bad input: exit 2.
    process.exit(err.exitCode === 0 ? 0 : 2);
  });

registerSolve(program);
registerDemo(program);
registerSpinodal(program);
registerTrain(program);
registerSynth(program);
registerInvert(program);
registerReport(program);
registerSweep(program);
registerPredict(program);
registerReflectivity(program);
registerSchema(program);

await program.parseAsync(process.argv);
