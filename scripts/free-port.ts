import net from 'node:net';
import type { ChildProcess } from 'node:child_process';

/** A TCP port on the loopback that is free right now (the OS picks it), for test and bench servers. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
    srv.on('error', reject);
  });
}

/**
 * Waits until a spawned server (started with PORT=0, so the OS gives it a free port with no race against other
 * test servers) has printed the port it listens on and answers `/api/health` there; answers that port. Call it
 * right after spawning, before any await, so the line is not missed.
 */
export async function untilServing(child: ChildProcess, log: () => string, timeoutMs = 90_000): Promise<number> {
  let port = 0;
  let tail = '';
  const hear = (d: Buffer | string) => {
    tail = (tail + String(d)).slice(-4096);
    const m = /is listening on http:\/\/localhost:(\d+) /.exec(tail);
    if (m) port = Number(m[1]);
  };
  child.stdout?.on('data', hear);
  try {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      if (child.exitCode !== null || child.signalCode !== null) throw new Error(`server exited early:\n${log()}`);
      if (port) {
        try {
          if ((await fetch(`http://127.0.0.1:${port}/api/health`)).ok) return port;
        } catch {
          /* not answering yet */
        }
      }
      if (Date.now() > deadline) throw new Error(`server did not start serving within ${timeoutMs / 1000} s:\n${log()}`);
      await new Promise((r) => setTimeout(r, 200));
    }
  } finally {
    child.stdout?.off('data', hear);
  }
}
