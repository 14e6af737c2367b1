// The server's running state as requests see it: how many are in flight, and whether it is draining for a shutdown.
import type { RequestHandler } from 'express';
import { errorBody } from './http/errors.ts';

export class Lifecycle {
  draining = false;
  private active = 0;
  private waiters: (() => void)[] = [];

  get inFlight() {
    return this.active;
  }

  /**
   * Counts every request until its response is finished or its connection closes. While draining, new requests
   * (other than the health check) get 503 with words and `Connection: close`; those already in flight go on.
   */
  middleware(): RequestHandler {
    return (req, res, next) => {
      if (this.draining && !req.path.startsWith('/api/health')) {
        res.set({ Connection: 'close', 'Retry-After': '5' });
        res.status(503).json(errorBody('unavailable', 'The server is restarting. Nothing was changed; try again in a moment.'));
        return;
      }
      this.active++;
      let done = false;
      const finish = () => {
        if (done) return;
        done = true;
        this.active--;
        if (this.active === 0) for (const w of this.waiters.splice(0)) w();
      };
      res.once('finish', finish);
      res.once('close', finish);
      next();
    };
  }

  /** Resolves true once no request is in flight, or false when `timeoutMs` passes first. */
  idle(timeoutMs: number): Promise<boolean> {
    if (this.active === 0) return Promise.resolve(true);
    return new Promise((resolve) => {
      const timer = setTimeout(() => {
        this.waiters = this.waiters.filter((w) => w !== onIdle);
        resolve(false);
      }, timeoutMs);
      const onIdle = () => {
        clearTimeout(timer);
        resolve(true);
      };
      this.waiters.push(onIdle);
    });
  }
}
