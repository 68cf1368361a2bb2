/**
 * Work written as a generator that yields between slices, so one caller can run it to its end at once (a
 * request's short transaction) and another can give the event loop a turn between slices (an import's
 * transaction of 100,000 readings, held open on a connection of its own across turns: decision 0017).
 * What it yields is how far it got, 0–1, for a progress bar.
 */
export type Steps<T> = Generator<number, T, void>;

/** Runs the steps to their end without pausing, and answers their result. */
export function runSteps<T>(steps: Steps<T>): T {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}
