/** The sections of a report, in page order. A new section is added to this list. */
import { appendixSection } from './appendix-section.js';
import { filmSection } from './film-section.js';
import { filmSweepSection } from './film-sweep-section.js';
import { filmFitSection } from './film-fit-section.js';
import { inversionSection } from './inversion-section.js';
import { metricsSection } from './metrics-section.js';
import { periodSearchSection } from './period-search-section.js';
import { profilesSection } from './profiles-section.js';
import { propagatorSection } from './propagator-section.js';
import { scatteringSection } from './scattering-section.js';
import { braggSection } from './bragg-section.js';
import { measurementFitSection } from './measurement-fit-section.js';
import { surrogateSection } from './surrogate-section.js';
import { sweepSection } from './sweep-section.js';
import type { ReportSection } from './section.js';
import { titleSection } from './title-section.js';
import { trainingSection } from './training-section.js';

export const REPORT_SECTIONS: readonly ReportSection[] = [
  titleSection,
  surrogateSection,
  inversionSection,
  scatteringSection,
  braggSection,
  measurementFitSection,
  sweepSection,
  filmSweepSection,
  filmSection,
  filmFitSection,
  profilesSection,
  trainingSection,
  propagatorSection,
  periodSearchSection,
  metricsSection,
  appendixSection,
];

export type { ReportSection } from './section.js';
