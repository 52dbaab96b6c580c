/**
 * Iterative methods written once as generators, run two ways. A method yields after each of
 * its iterations and reads back whether to go on (false: stop now, with the iterate it has).
 * `runToEnd` drives it synchronously (always on); `runYielding` lets pending events run
 * between iterations (in Node a signal handler only runs when the event loop turns, so a
 * synchronous loop cannot be interrupted) and asks `shouldStop` after each pause. The
 * iterates are the same either way: the pause changes when, never what, is computed.
 */
export type Stepwise<Y, R> = Generator<Y, R, boolean>;

/** Run to the end without pausing. */
export function runToEnd<Y, R>(gen: Stepwise<Y, R>): R {
  let s = gen.next(true);
  while (!s.done) s = gen.next(true);
  return s.value;
}

/** Run with a pause (`pause`, e.g. one event-loop turn) after every iteration; stop when `shouldStop()` says so. */
export async function runYielding<Y, R>(gen: Stepwise<Y, R>, pause: () => Promise<void>, shouldStop: () => boolean): Promise<R> {
  let s = gen.next(true);
  while (!s.done) {
    await pause();
    s = gen.next(!shouldStop());
  }
  return s.value;
}
