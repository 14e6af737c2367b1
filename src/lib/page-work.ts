// Work a page must finish before it is left (a photo that uploads right after a new span's first save): the
// page that navigates away waits for it, while its progress shows. Shared by features through src/lib only.
const pending = new Set<Promise<unknown>>();

/** Registers work the page must not be left before. */
export function holdPage(work: Promise<unknown>) {
  pending.add(work);
  void work.finally(() => pending.delete(work)).catch(() => undefined);
}

/** Resolves once every held piece of work has settled, including work added while waiting. */
export async function pageWorkDone(): Promise<void> {
  while (pending.size) await Promise.allSettled([...pending]);
}

/** Whether any held work is still running. */
export const pageBusy = () => pending.size > 0;
