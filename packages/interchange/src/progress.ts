/**
 * Turns many fine-grained progress ticks into few callback calls: at most one per whole percent,
 * never going backwards, so a server can forward every call to a client.
 */
export class ProgressReporter {
  private last = -1;

  constructor(
    private readonly sink: ((fraction: number) => void) | undefined,
    private readonly from = 0,
    private readonly to = 1,
  ) {}

  /** Report `done` of `total` units of this reporter's share. */
  tick(done: number, total: number): void {
    if (!this.sink || total <= 0) return;
    const fraction = this.from + (this.to - this.from) * Math.min(1, done / total);
    const percent = Math.floor(fraction * 100);
    if (percent <= this.last) return;
    this.last = percent;
    this.sink(percent / 100);
  }

  /** A reporter for the sub-range [a, b] of this one's share (a and b in [0, 1]). */
  part(a: number, b: number): ProgressReporter {
    const span = this.to - this.from;
    return new ProgressReporter(this.sink && ((f) => this.forward(f)), this.from + span * a, this.from + span * b);
  }

  done(): void {
    this.tick(1, 1);
  }

  private forward(fraction: number): void {
    const percent = Math.floor(fraction * 100);
    if (percent <= this.last) return;
    this.last = percent;
    this.sink?.(percent / 100);
  }
}
