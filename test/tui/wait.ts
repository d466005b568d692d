/**
 * Waits until `check` holds (it is tried after every macrotask, so renders and
 * effects settle), failing with the last frame when it never does. This waits
 * for a state, it measures no time: the bound only stops a broken test.
 */
export async function until(check: () => boolean, frame: () => string | undefined, what: string, tries = 400): Promise<void> {
  for (let i = 0; i < tries; i++) {
    if (check()) return;
    await new Promise((r) => setTimeout(r, 5));
  }
  throw new Error(`never saw ${what}; last frame:\n${frame() ?? '(none)'}`);
}
