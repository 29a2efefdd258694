// Ensemble mean and standard deviation in one pass over the members (Welford 1962, Technometrics
// 4, 419-420): for the n-th value x, d = x - mean; mean += d / n; m2 += d (x - mean). The
// accumulators hold two float64 numbers per value, however many members come through, and no
// member is kept; the variance m2 / (n - 1) does not suffer the cancellation of the textbook
// sum-of-squares formula. NaN (land) stays NaN.
//
// A member's values may come in slices (record by record, field by field): startMember(), then
// addSlice() until every value has been given once, then endMember().

export class WelfordAccumulator {
  readonly mean: Float64Array;
  readonly m2: Float64Array;
  /** Members added. */
  count = 0;
  private open = false;
  private given = 0;

  constructor(readonly length: number) {
    this.mean = new Float64Array(length);
    this.m2 = new Float64Array(length);
  }

  /** Bytes the accumulators hold (for the memory estimate). */
  get bytes(): number {
    return 16 * this.length;
  }

  startMember(): void {
    if (this.open) throw new Error('WelfordAccumulator: the previous member was not ended');
    this.open = true;
    this.given = 0;
  }

  /** Values [offset, offset + values.length) of the member being added. */
  addSlice(offset: number, values: ArrayLike<number>): void {
    if (!this.open) throw new Error('WelfordAccumulator: startMember() first');
    if (offset < 0 || offset + values.length > this.length)
      throw new RangeError(`WelfordAccumulator: slice ${offset}..${offset + values.length} outside 0..${this.length}`);
    const n = this.count + 1;
    const mean = this.mean;
    const m2 = this.m2;
    for (let k = 0; k < values.length; k++) {
      const x = values[k];
      const at = offset + k;
      const d = x - mean[at];
      mean[at] += d / n;
      m2[at] += d * (x - mean[at]);
    }
    this.given += values.length;
  }

  endMember(): void {
    if (!this.open) throw new Error('WelfordAccumulator: no member was started');
    if (this.given !== this.length)
      throw new Error(`WelfordAccumulator: the member gave ${this.given} values, expected ${this.length}`);
    this.open = false;
    this.count++;
  }

  /** Add a whole member at once. */
  add(values: ArrayLike<number>): void {
    this.startMember();
    this.addSlice(0, values);
    this.endMember();
  }

  /** The sample standard deviation (n - 1 in the denominator) of slot k; NaN below two members. */
  std(k: number): number {
    return this.count >= 2 ? Math.sqrt(this.m2[k] / (this.count - 1)) : NaN;
  }

  /** Means of [from, from + n) (NaN when no member was added). */
  meanSlice(from: number, n: number): Float64Array {
    const out = this.mean.slice(from, from + n);
    if (this.count === 0) out.fill(NaN);
    return out;
  }

  stdSlice(from: number, n: number): Float64Array {
    const out = new Float64Array(n);
    for (let k = 0; k < n; k++) out[k] = this.std(from + k);
    return out;
  }
}
