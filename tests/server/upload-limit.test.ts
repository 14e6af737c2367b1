import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { makeTestApp, type TestApp } from './helpers.ts';

// Uploads are limited per user (UPLOAD_BURST per UPLOAD_WINDOW_MS), so one account cannot flood the disk.
let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000, uploadBurst: 3, uploadWindowMs: 60_000 });
});
afterAll(() => t.close());

describe('upload rate limit', () => {
  it('when a user uploads more than the limit, then 429 says so in words, and another user still uploads', async () => {
    const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } }).png().toBuffer();
    const surveyor = await t.as('surveyor');
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) statuses.push((await surveyor.upload('/api/photos').attach('photo', png, `p${i}.png`)).status);
    expect(statuses).toEqual([201, 201, 201, 429]);
    const over = await surveyor.upload('/api/photos').attach('photo', png, 'p5.png');
    expect(over.status).toBe(429);
    expect(over.body.error.message).toMatch(/Too many photo uploads/);
    const safety = await t.as('safety');
    expect((await safety.upload('/api/photos').attach('photo', png, 's.png')).status).toBe(201);
  });
});
