declare module 'fft.js' {
  /** Radix-4 complex FFT on interleaved [re, im, re, im, …] arrays; inverse is normalised by 1/n. */
  export default class FFT {
    constructor(size: number);
    readonly size: number;
    createComplexArray(): number[];
    toComplexArray(input: ArrayLike<number>, storage?: number[]): number[];
    fromComplexArray(complex: ArrayLike<number>, storage?: number[]): number[];
    completeSpectrum(spectrum: number[] | Float64Array): void;
    transform(out: number[] | Float64Array, data: ArrayLike<number>): void;
    realTransform(out: number[] | Float64Array, data: ArrayLike<number>): void;
    inverseTransform(out: number[] | Float64Array, data: ArrayLike<number>): void;
  }
}
