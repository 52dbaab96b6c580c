/**
 * chart.js configured once for static, deterministic drawing: no animation, no
 * responsiveness (the region fixes the size), pixel ratio 1 (the region's transform
 * does the DPI scaling), and the report font.
 */
import { Chart, registerables } from 'chart.js';
import { FONT_FAMILY, TEXT } from '../style.js';

let ready = false;

export function chartJs(): typeof Chart {
  if (!ready) {
    Chart.register(...registerables);
    Chart.defaults.font.family = FONT_FAMILY;
    Chart.defaults.font.size = TEXT.tick;
    Chart.defaults.color = '#000000';
    Chart.defaults.animation = false;
    Chart.defaults.responsive = false;
    Chart.defaults.maintainAspectRatio = false;
    Chart.defaults.devicePixelRatio = 1;
    ready = true;
  }
  return Chart;
}
