/** A predicted Bragg pattern: Gaussian peaks of the given width at q_n = 2πn/D with areas I_n/I_1, and the table of orders. */
import type { ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { BraggReportInput } from '../bragg-input.js';
import type { ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sig } from '../format.js';
import type { ReportSection } from './section.js';

function braggPage(b: BraggReportInput): ReportPage {
  return {
    heading: `Bragg pattern of the lamella at χN = ${sig(b.chiN, 5)}`,
    blocks: [
      {
        type: 'figure',
        id: 'bragg-pattern',
        width: CONTENT_WIDTH,
        height: 260,
        caption: `Figure: predicted pattern, ${b.peaks.length} orders as Gaussian peaks of standard deviation ${sig(b.width, 3)} (${b.qLabel}) with areas I_n/I_1 from the composition profile's Fourier coefficients${b.lorentz ? ', powder Lorentz factor 1/q² applied' : ''}; period ${b.periodText}. Logarithmic intensities would show the weak orders; here the scale is linear.`,
        draw: (r) =>
          drawLineChart(r, {
            series: [{ label: 'I(q)', style: 0, points: b.curve.q.map((q, i) => ({ x: q, y: b.curve.I[i] })) }],
            xLabel: b.qLabel,
            yLabel: 'I (relative to order 1)',
            legend: false,
            guides: b.peaks.map((p) => ({ axis: 'x' as const, value: p.q, label: `${p.order}`, style: 2 })),
          }),
      },
      {
        type: 'table',
        header: ['order', `q (${b.qLabel})`, 'I_n / I_1'],
        widths: [1, 2, 2],
        alignRight: [0, 1, 2],
        rows: b.peaks.map((p) => [String(p.order), sig(p.q, 6), p.relative.toExponential(3)]),
      },
    ],
  };
}

export const braggSection: ReportSection = {
  id: 'bragg',
  pages: (input: ReportInput) => (input.bragg ? [braggPage(input.bragg)] : []),
};
