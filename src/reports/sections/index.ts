/** The sections of a report, in page order. A new section is added to this list. */
import { filmFitSection } from './film-fit-section.js';
import { inversionSection } from './inversion-section.js';
import { metricsSection } from './metrics-section.js';
import { periodSearchSection } from './period-search-section.js';
import { profilesSection } from './profiles-section.js';
import { propagatorSection } from './propagator-section.js';
import { surrogateSection } from './surrogate-section.js';
import type { ReportSection } from './section.js';
import { titleSection } from './title-section.js';
import { trainingSection } from './training-section.js';

export const REPORT_SECTIONS: readonly ReportSection[] = [titleSection, surrogateSection, profilesSection, propagatorSection, periodSearchSection, trainingSection, inversionSection, filmFitSection, metricsSection];

export type { ReportSection } from './section.js';
