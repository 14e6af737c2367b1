// Work a page must finish before it is left (a photo that uploads right after a new span's first save): the
// page that navigates away waits for it, while its progress shows. Shared by features through src/lib only.
// A piece of work that failed stays registered until the page has been told (pageWorkDone) or its owner
// forgets it: a refusal that arrives before the page asks is not lost.
const held = new Set<Promise<boolean>>();

/** Registers work the page must not be left before; it resolves to whether it succeeded. Returns "forget it". */
export function holdPage(work: Promise<boolean>): () => void {
  held.add(work);
  // A success needs no report; a failure waits for pageWorkDone or its owner's forget.
  void work.then(
    (ok) => ok && held.delete(work),
    () => undefined,
  );
  return () => void held.delete(work);
}

/** Resolves once every held piece of work has settled (including work added while waiting): true when all succeeded.
 * Failures are reported once: the work is then forgotten. */
export async function pageWorkDone(): Promise<boolean> {
  let ok = true;
  while (held.size) {
    const list = [...held];
    const results = await Promise.allSettled(list);
    results.forEach((r, i) => {
      ok &&= r.status === 'fulfilled' && r.value;
      held.delete(list[i]!);
    });
  }
  return ok;
}

/** Whether held work is still running, or failed and has not been reported yet. */
export const pageBusy = () => held.size > 0;
