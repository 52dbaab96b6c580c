/**
 * The CSV readers of measured spacings, Bragg peaks and scattering curves all read through
 * io/column-csv.ts: values come back in the documented units (q in Å⁻¹ is × 10 in nm⁻¹,
 * 1 Å = 0.1 nm, a unit identity), and every refusal names the file, the line, the column and
 * what is allowed (the project's rule for bad input, common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { parsePeaksCsv } from '../../src/inverse/bragg/bragg-inputs.js';
import { parseScatteringCsv } from '../../src/inverse/scattering/scattering-csv.js';
import { parseSpacingCsv } from '../../src/inverse/spacing-csv.js';

describe('spacing CSV (N, D_nm, dD_nm)', () => {
  it('reads the columns in any order and any row order', () => {
    const d = parseSpacingCsv('# spacings\nD_nm,N,dD_nm\n20,100,0.5\n14,50,0.4\n\n30,200,0.6\n', 's.csv');
    expect(d.N).toEqual([100, 50, 200]);
    expect(d.D).toEqual([20, 14, 30]);
    expect(d.dD).toEqual([0.5, 0.4, 0.6]);
    expect(parseSpacingCsv('N,D_nm\n50,14\n', 's.csv').dD).toBeUndefined();
  });

  it('names the file, line, column and what is allowed', () => {
    expect(() => parseSpacingCsv('N,D\n50,14\n', 's.csv')).toThrow(/^s\.csv: line 1, column 2 \("D"\): unknown column; allowed columns: N, D_nm, and optionally dD_nm$/);
    expect(() => parseSpacingCsv('N,dD_nm\n50,1\n', 's.csv')).toThrow(/s\.csv: line 1: the header has no D_nm column/);
    expect(() => parseSpacingCsv('N,D_nm\n50,14\n100,-2\n', 's.csv')).toThrow(/^s\.csv: line 3, column 2 \(D_nm\): got -2; allowed: a number > 0$/);
    expect(() => parseSpacingCsv('N,D_nm\n50,abc\n', 's.csv')).toThrow(/^s\.csv: line 2, column 2 \(D_nm\): got "abc"; allowed: a finite number$/);
    expect(() => parseSpacingCsv('N,D_nm\n50,14,3\n', 's.csv')).toThrow(/s\.csv: line 2, column 3 \(extra value "3"\): 3 values, but the header on line 1 names 2 columns/);
    expect(() => parseSpacingCsv('N,D_nm\n', 's.csv')).toThrow(/s\.csv: no data rows after the header on line 1/);
  });
});

describe('Bragg peaks CSV (order, q_per_nm | q_per_A, I, dI, dq)', () => {
  it('converts q and dq from Å⁻¹ to nm⁻¹ and keeps the row order', () => {
    const d = parsePeaksCsv('order,q_per_A,I,dI,dq\n2,0.04,10,1,0.001\n1,0.02,100,2,0.001\n', 'p.csv');
    expect(d.qUnit).toBe('per_A');
    expect(d.order).toEqual([2, 1]);
    expect(d.q[0]).toBeCloseTo(0.4, 14);
    expect(d.q[1]).toBeCloseTo(0.2, 14);
    expect(d.dq![0]).toBeCloseTo(0.01, 14);
    expect(d.intensity).toEqual([10, 100]);
    expect(d.dI).toEqual([1, 2]);
    expect(parsePeaksCsv('order,q_per_nm,I,dI\n1,0.2,100,2\n', 'p.csv').dq).toBeUndefined();
  });

  it('names the file, line, column and what is allowed', () => {
    expect(() => parsePeaksCsv('order,q,I,dI\n1,0.2,100,2\n', 'p.csv')).toThrow(/^p\.csv: line 1, column 2 \("q"\): unknown column; name the unit of q in the header: q_per_nm or q_per_A; allowed columns: q_per_nm or q_per_A, order, I, dI, and optionally dq$/);
    expect(() => parsePeaksCsv('order,q_per_nm,q_per_A,I,dI\n1,0.2,0.02,100,2\n', 'p.csv')).toThrow(/p\.csv: line 1: both q_per_nm and q_per_A columns; give one q column/);
    expect(() => parsePeaksCsv('order,q_per_nm,I\n1,0.2,100\n', 'p.csv')).toThrow(/p\.csv: line 1: the header has no dI column/);
    expect(() => parsePeaksCsv('order,q_per_nm,I,dI\n1.5,0.2,100,2\n', 'p.csv')).toThrow(/^p\.csv: line 2, column 1 \(order\): got 1\.5; allowed: a whole number from 1 to 64$/);
    expect(() => parsePeaksCsv('order,q_per_nm,I,dI\n1,0.2,100,2\n1,0.4,10,1\n', 'p.csv')).toThrow(/^p\.csv: line 3, column 1 \(order\): order 1 given twice \(also on line 2\)$/);
    expect(() => parsePeaksCsv('order,q_per_nm,I,dI\n1,0.2,100,0\n', 'p.csv')).toThrow(/^p\.csv: line 2, column 4 \(dI\): got 0; allowed: a standard deviation > 0$/);
    expect(() => parsePeaksCsv('order,q_per_nm,I,dI\n1,-0.2,100,1\n', 'p.csv')).toThrow(/^p\.csv: line 2, column 2 \(q_per_nm\): got -0\.2; allowed: q > 0$/);
    expect(() => parsePeaksCsv('', 'p.csv')).toThrow(/p\.csv: the file is empty; expected a header row/);
  });
});

describe('scattering CSV (q_per_nm | q_per_A, I, dI)', () => {
  it('reads q in nm⁻¹ or Å⁻¹, with or without dI', () => {
    const d = parseScatteringCsv('\uFEFFI,q_per_nm\r\n5,0.1\r\n6,0.2\r\n', 'i.csv');
    expect(d.qUnit).toBe('per_nm');
    expect(Array.from(d.q)).toEqual([0.1, 0.2]);
    expect(Array.from(d.intensity)).toEqual([5, 6]);
    expect(d.sigma).toBeUndefined();
    expect(d.lines).toEqual([2, 3]);
  });

  it('names the file, line, column and what is allowed', () => {
    expect(() => parseScatteringCsv('q_per_nm,I\n0.2,5\n0.2,4\n', 'i.csv')).toThrow(/^i\.csv: line 3, column 1 \(q_per_nm\): got 0\.2, the same q as line 2; q must increase strictly \(merge or remove repeated rows\)$/);
    expect(() => parseScatteringCsv('q_per_nm,I\n0.30,5\n0.20,4\n', 'i.csv')).toThrow(/^i\.csv: line 3, column 1 \(q_per_nm\): got 0\.20 after 0\.3 on line 2; q must increase strictly \(sort the rows by q\)$/);
    expect(() => parseScatteringCsv('q_per_nm,I\n0,5\n', 'i.csv')).toThrow(/^i\.csv: line 2, column 1 \(q_per_nm\): got 0; allowed: q > 0$/);
    expect(() => parseScatteringCsv('q_per_nm,I,dI\n0.1,5,-1\n', 'i.csv')).toThrow(/^i\.csv: line 2, column 3 \(dI\): got -1; allowed: a standard deviation > 0$/);
    expect(() => parseScatteringCsv('I,dI\n5,1\n', 'i.csv')).toThrow(/i\.csv: line 1: the header has no q column; allowed columns: q_per_nm or q_per_A, I, and optionally dI/);
    expect(() => parseScatteringCsv('0.1,5\n0.2,6\n', 'i.csv')).toThrow(/i\.csv: line 1, column 1 \("0\.1"\): the first line must be a header row/);
  });
});
