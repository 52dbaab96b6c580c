import { describe, expect, it } from 'vitest';
import { agreementText, offsetInData } from '../../src/inverse/inversion-result.js';

describe('--method both: agreement in words', () => {
  const pair = (difference: number, z: number, intervalsOverlap: boolean) => ({ a: 'classical', b: 'network', difference, relativeDifference: difference / 15, z, intervalsOverlap, eachWithinOthersInterval: false });
  it('says DISAGREE beyond two combined sd or without overlap, and cannot judge without an interval', () => {
    expect(agreementText(pair(0.5, 3.2, false))).toMatch(/3\.20 × the combined sd, 68\.3% intervals do not overlap: the estimates DISAGREE/);
    expect(agreementText(pair(0.05, 0.4, true))).toMatch(/agree within their combined one-sigma uncertainty/);
    expect(agreementText(pair(0.05, Number.NaN, false))).toMatch(/cannot be judged/);
  });
  it('moves the offset by whole periods into the data range', () => {
    expect(offsetInData(0.7, 4, 10)).toBeCloseTo(12.7, 12);
    expect(offsetInData(0.7, 4, 0)).toBeCloseTo(0.7, 12);
  });
});
