import { beforeEach, describe, expect, it, vi } from 'vitest';

type PageWork = typeof import('../../src/lib/page-work.ts');
let pw: PageWork;
beforeEach(async () => {
  vi.resetModules();
  pw = await import('../../src/lib/page-work.ts');
});

const settled = () => new Promise((r) => setTimeout(r, 0));

describe('work a page must finish before it is left', () => {
  it('when held work fails before the page asks, then the page still hears of the failure, once', async () => {
    pw.holdPage(Promise.resolve(false));
    await settled();
    expect(pw.pageBusy()).toBe(true);
    expect(await pw.pageWorkDone()).toBe(false);
    expect(pw.pageBusy()).toBe(false);
    expect(await pw.pageWorkDone()).toBe(true);
  });

  it('when held work succeeds before the page asks, then nothing is left to wait for', async () => {
    pw.holdPage(Promise.resolve(true));
    await settled();
    expect(pw.pageBusy()).toBe(false);
    expect(await pw.pageWorkDone()).toBe(true);
  });

  it('when work is still running, then the page waits for it and for work added meanwhile', async () => {
    let finish!: (ok: boolean) => void;
    pw.holdPage(new Promise<boolean>((r) => (finish = r)));
    const done = pw.pageWorkDone();
    pw.holdPage(Promise.resolve(false));
    finish(true);
    expect(await done).toBe(false);
  });

  it('when a failure is forgotten by its owner (tried again or removed), then the page no longer hears of it', async () => {
    const forget = pw.holdPage(Promise.resolve(false));
    await settled();
    forget();
    expect(pw.pageBusy()).toBe(false);
    expect(await pw.pageWorkDone()).toBe(true);
  });
});
