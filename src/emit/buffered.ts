// Output gathered into large chunks before it reaches a stream (stdout of `strata transcribe`):
// one write call per ~64 KiB instead of one per line, with the stream's back-pressure respected.

/** Characters gathered before a write (UTF-16 units; about 64–128 KiB of UTF-8). */
const CHUNK = 1 << 16;

export class BufferedWriter {
  private buf = "";

  constructor(private readonly stream: NodeJS.WritableStream, private readonly chunk = CHUNK) {}

  /** Adds text; returns a promise only when a full chunk had to wait for the stream to drain. */
  write(text: string): Promise<void> | undefined {
    this.buf += text;
    return this.buf.length >= this.chunk ? this.flush() : undefined;
  }

  /** Writes what is gathered; resolves when the stream can take more. */
  flush(): Promise<void> | undefined {
    if (this.buf === "") return undefined;
    const text = this.buf;
    this.buf = "";
    if (this.stream.write(text)) return undefined;
    return new Promise((res) => this.stream.once("drain", () => res()));
  }
}
