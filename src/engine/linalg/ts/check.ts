/** Shape check shared by the TypeScript kernels: an array must hold `needComplex` interleaved complex numbers. */
export function check(name: string, arr: Float64Array, needComplex: number): void {
  if (arr.length < 2 * needComplex) {
    throw new RangeError(`${name}: array holds ${arr.length / 2} complex numbers, needs ${needComplex}`);
  }
}
