// Output gathered into large chunks before it reaches a stream (stdout of `strata transcribe`):
// text is encoded into UTF-8 chunks of about 1 MiB (emit/bytes.ts: a stream given a string encodes
// it on a slow path) and written one chunk per call, with the stream's back-pressure respected.

import { ByteChunks } from "./bytes.js";

export class BufferedWriter {
  private readonly ready: Uint8Array[] = [];
  private readonly chunks: ByteChunks;

  constructor(private readonly stream: NodeJS.WritableStream, chunk?: number) {
    this.chunks = new ByteChunks((c) => void this.ready.push(c), chunk);
  }

  /** Adds text; returns a promise only when a full chunk had to wait for the stream to drain. */
  write(text: string): Promise<void> | undefined {
    this.chunks.push(text);
    return this.ready.length > 0 ? this.send() : undefined;
  }

  /**
   * The chunks being gathered, for bytes put straight into them (tsv-batch.ts); `settle` after
   * putting them.
   */
  get bytes(): ByteChunks {
    return this.chunks;
  }

  /** After bytes were put: returns a promise only when a full chunk had to wait for the stream to drain. */
  settle(): Promise<void> | undefined {
    return this.ready.length > 0 ? this.send() : undefined;
  }

  /** Writes what is gathered; resolves when the stream can take more. */
  flush(): Promise<void> | undefined {
    this.chunks.flush();
    return this.ready.length > 0 ? this.send() : undefined;
  }

  private send(): Promise<void> | undefined {
    let more = true;
    for (const c of this.ready.splice(0)) more = this.stream.write(c);
    if (more) return undefined;
    return new Promise((res) => this.stream.once("drain", () => res()));
  }
}
