// The installable app: manifest, icons, a service worker controlling the page, and the app shell with no network.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

interface Manifest {
  name: string;
  short_name: string;
  start_url: string;
  display: string;
  theme_color: string;
  background_color: string;
  icons: { src: string; sizes: string; type: string; purpose?: string }[];
}

describe('installable app', () => {
  it('when the app is opened, then its manifest is linked and complete, every icon is the size it claims, and Chromium finds it installable', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await page.goto('/sign-in');
    const href = await page.locator('link[rel="manifest"]').getAttribute('href');
    expect(href).toBe('/manifest.webmanifest');
    const res = await fetch(`${h.baseUrl}${href}`);
    expect(res.status).toBe(200);
    const m = (await res.json()) as Manifest;
    // Install criteria: name or short_name, start_url, display standalone|fullscreen|minimal-ui, a 192 px and a 512 px icon
    // (web.dev "What does it take to be installable?", read for this test).
    expect(m.name).toBe('Roostline');
    expect(m.short_name).toBe('Roostline');
    expect(m.start_url).toBe('/');
    expect(m.display).toBe('standalone');
    expect(m.theme_color).toBe('#12343b');
    expect(m.background_color).toBe('#f7f4ee');
    for (const need of ['192x192', '512x512']) expect(m.icons.some((i) => i.sizes === need && (i.purpose ?? 'any').includes('any'))).toBe(true);
    expect(m.icons.some((i) => i.purpose === 'maskable')).toBe(true);
    for (const icon of m.icons) {
      const r = await fetch(`${h.baseUrl}${icon.src}`);
      expect(r.status, icon.src).toBe(200);
      expect(r.headers.get('content-type')).toBe('image/png');
      const meta = await sharp(Buffer.from(await r.arrayBuffer())).metadata();
      expect(`${meta.width}x${meta.height}`, icon.src).toBe(icon.sizes);
    }

    // A worker registers, activates and controls the page (clientsClaim), without a reload.
    const sw = await page.evaluate(async () => {
      const reg = await navigator.serviceWorker.ready;
      for (let i = 0; i < 100 && !navigator.serviceWorker.controller; i++) await new Promise((r) => setTimeout(r, 100));
      return { state: reg.active?.state, script: reg.active?.scriptURL, controlled: !!navigator.serviceWorker.controller };
    });
    expect(sw.state).toBe('activated');
    expect(sw.script).toBe(`${h.baseUrl}/sw.js`);
    expect(sw.controlled).toBe(true);

    // Chromium's own installability check (the one behind its install button), through the DevTools protocol.
    const cdp = await context.newCDPSession(page);
    const { installabilityErrors } = (await cdp.send('Page.getInstallabilityErrors')) as { installabilityErrors: { errorId: string }[] };
    // The test's browser context is a private one, which Chromium never offers to install into: that is the browser, not the app.
    expect(installabilityErrors.map((e) => e.errorId).filter((id) => id !== 'in-incognito')).toEqual([]);
    const manifest = (await cdp.send('Page.getAppManifest')) as { url: string; errors: { message: string; critical: number }[] };
    expect(manifest.url).toBe(`${h.baseUrl}/manifest.webmanifest`);
    expect(manifest.errors).toEqual([]);
    await context.close();
  });

  it('when a surveyor has opened the field queue and loses the network, then a reload still shows the app, their queue and the map assets', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    await page.getByRole('heading', { level: 1, name: 'Field queue' }).waitFor();
    const firstSpan = page.locator('main a[data-span-id]').first();
    await firstSpan.waitFor();
    const spanText = await firstSpan.innerText();
    // The app shell, fonts, map style, glyph fonts and sprites are precached when the worker installs.
    const cached = await page.evaluate(async () => {
      await navigator.serviceWorker.ready;
      const names = await caches.keys();
      const urls: string[] = [];
      for (const n of names) for (const req of await (await caches.open(n)).keys()) urls.push(new URL(req.url).pathname);
      return urls;
    });
    for (const p of ['/index.html', '/map/style.json', '/map/fonts/label-latin.woff2', '/map/sprites/sprite.png', '/map/sprites/sprite@2x.json', '/manifest.webmanifest']) {
      expect(cached, p).toContain(p);
    }
    expect(cached.some((p) => /^\/assets\/index-.*\.js$/.test(p))).toBe(true);
    expect(cached.some((p) => /inter-latin-wght-normal.*\.woff2$/.test(p))).toBe(true);
    // The persisted query cache is written a moment after the last change.
    await page.waitForTimeout(1500);

    await context.setOffline(true);
    await page.reload();
    await page.getByRole('heading', { level: 1, name: 'Field queue' }).waitFor();
    await page.getByText(spanText.split('\n')[0]).first().waitFor();
    const style = await page.evaluate(async () => {
      const r = await fetch('/map/style.json');
      return { status: r.status, version: ((await r.json()) as { version: number }).version };
    });
    expect(style).toEqual({ status: 200, version: 8 });
    await context.close();
  });

  it('when someone who never signed in on this device opens the app offline, then the sign-in page says a first sign-in needs the network', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await page.goto('/sign-in');
    await page.evaluate(async () => {
      await navigator.serviceWorker.ready;
      for (let i = 0; i < 100 && !navigator.serviceWorker.controller; i++) await new Promise((r) => setTimeout(r, 100));
    });
    await context.setOffline(true);
    await page.goto('/field');
    await page.waitForURL((u) => u.pathname === '/sign-in');
    expect(await page.getByTestId('offline-sign-in').innerText()).toContain('Signing in needs the network once');
    await context.close();
  });
});
