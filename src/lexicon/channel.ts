// A small push-to-pull bridge: the runner pushes output chunks, a file writer pulls them as an
// async iterable; failing the channel makes the writer's iteration throw (so its temp file is removed).

export class Channel<T> implements AsyncIterable<T> {
  private readonly queue: T[] = [];
  private waiting: ((r: IteratorResult<T>) => void) | undefined;
  private failWaiting: ((e: unknown) => void) | undefined;
  private closed = false;
  private error: unknown = undefined;
  private failed = false;

  push(item: T): void {
    if (this.closed || this.failed) throw new Error("push on a closed channel");
    const w = this.waiting;
    if (w !== undefined) {
      this.waiting = undefined;
      this.failWaiting = undefined;
      w({ value: item, done: false });
    } else {
      this.queue.push(item);
    }
  }

  close(): void {
    this.closed = true;
    const w = this.waiting;
    if (w !== undefined && this.queue.length === 0) {
      this.waiting = undefined;
      this.failWaiting = undefined;
      w({ value: undefined as never, done: true });
    }
  }

  fail(err: unknown): void {
    this.failed = true;
    this.error = err;
    const f = this.failWaiting;
    if (f !== undefined) {
      this.waiting = undefined;
      this.failWaiting = undefined;
      f(err);
    }
  }

  /** Items pushed but not yet pulled (for back-pressure: the producer yields while this is large). */
  get backlog(): number {
    return this.queue.length;
  }

  [Symbol.asyncIterator](): AsyncIterator<T> {
    return {
      next: (): Promise<IteratorResult<T>> => {
        if (this.failed) return Promise.reject(this.error);
        if (this.queue.length > 0) return Promise.resolve({ value: this.queue.shift() as T, done: false });
        if (this.closed) return Promise.resolve({ value: undefined as never, done: true });
        return new Promise<IteratorResult<T>>((resolve, reject) => {
          this.waiting = resolve;
          this.failWaiting = reject;
        });
      },
    };
  }
}
