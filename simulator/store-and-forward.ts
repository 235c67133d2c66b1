/**
 * Bounded first-in-first-out buffer of a unit's outgoing messages. While the unit has no link everything waits here (the
 * oldest are dropped, and counted, when it is full); once the link is back it is drained in the original order, so the
 * messages keep their original timestamps and sequence numbers.
 */
export class StoreAndForward<T> {
  private items: T[] = [];
  private head = 0;
  /** Messages dropped because the buffer was full. */
  dropped = 0;

  constructor(readonly capacity: number) {
    if (!(capacity >= 1)) throw new RangeError(`capacity must be ≥ 1, got ${capacity}`);
  }

  get size(): number {
    return this.items.length - this.head;
  }

  push(item: T): void {
    if (this.size >= this.capacity) {
      this.head++;
      this.dropped++;
    }
    this.items.push(item);
    if (this.head > 1024 && this.head * 2 > this.items.length) {
      this.items = this.items.slice(this.head);
      this.head = 0;
    }
  }

  /** Removes and returns up to `max` of the oldest items, in order. */
  drain(max = Infinity): T[] {
    const n = Math.min(max, this.size);
    const out = this.items.slice(this.head, this.head + n);
    this.head += n;
    if (this.head === this.items.length) {
      this.items = [];
      this.head = 0;
    }
    return out;
  }

  /** Puts items back at the front (a send that failed), keeping their order. */
  unshift(items: T[]): void {
    if (items.length === 0) return;
    this.items = [...items, ...this.items.slice(this.head)];
    this.head = 0;
    while (this.size > this.capacity) {
      this.head++;
      this.dropped++;
    }
  }
}
