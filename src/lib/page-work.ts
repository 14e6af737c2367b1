// Work a page must finish before it is left (a photo that uploads right after a new span's first save): the
// page that navigates away waits for it, while its progress shows. Shared by features through src/lib only.
const pending = new Set<Promise<boolean>>();

/** Registers work the page must not be left before; it resolves to whether it succeeded. */
export function holdPage(work: Promise<boolean>) {
  pending.add(work);
  void work.finally(() => pending.delete(work)).catch(() => undefined);
}

/** Resolves once every held piece of work has settled (including work added while waiting): true when all succeeded. */
export async function pageWorkDone(): Promise<boolean> {
  let ok = true;
  while (pending.size) for (const r of await Promise.allSettled([...pending])) ok &&= r.status === 'fulfilled' && r.value;
  return ok;
}

/** Whether any held work is still running. */
export const pageBusy = () => pending.size > 0;
