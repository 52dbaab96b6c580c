/** The report input of a predicted Bragg pattern (bragg-pattern): the peaks and the drawn curve, q in 1/Rg or nm⁻¹. */
export interface BraggReportInput {
  qLabel: string;
  chiN: number;
  periodText: string;
  lorentz: boolean;
  width: number;
  peaks: { order: number; q: number; relative: number }[];
  curve: { q: number[]; I: number[] };
}
