/**
 * A reader that closes our stdout early (`mesofield invert --json data.csv | head -1`) is not
 * an error of the run: the write fails with EPIPE, which Node raises as an 'error' event on
 * the stream and, unhandled, as an uncaught exception (an "internal error" with exit 4).
 * Common practice for a closed pipe (no source): stop writing there quietly, without a message.
 * Here the run itself goes on to its end, so the files it writes are complete, and the exit code
 * is the run's own; later writes to the closed stream are dropped. The same holds for stderr
 * (`2>&1 | head`).
 */
import type { Writable } from 'node:stream';

const closed = new Set<Writable>();

/** Is this stream's reader gone (an EPIPE was seen on it)? */
export function streamClosed(stream: Writable): boolean {
  return closed.has(stream);
}

function onClose(stream: NodeJS.WriteStream): (e: NodeJS.ErrnoException) => void {
  return (e) => {
    if (e?.code !== 'EPIPE' && e?.code !== 'ERR_STREAM_DESTROYED') throw e;
    if (closed.has(stream)) return;
    closed.add(stream);
    // Later writes go nowhere; they never throw or call back with an error.
    stream.write = ((_chunk: unknown, encOrCb?: unknown, cb?: unknown) => {
      const done = typeof encOrCb === 'function' ? encOrCb : cb;
      if (typeof done === 'function') queueMicrotask(() => (done as () => void)());
      return true;
    }) as typeof stream.write;
  };
}

/** Let stdout and stderr end quietly when their reader closes (call once, in the CLI's entry). */
export function tolerateClosedPipes(): void {
  process.stdout.on('error', onClose(process.stdout));
  process.stderr.on('error', onClose(process.stderr));
}
