import { describe, expect, it } from 'vitest';
import { JobRunner } from '../../server/modules/jobs/job-runner.ts';

const tick = () => new Promise((r) => setTimeout(r, 5));

describe('background job runner', () => {
  it('when jobs are queued, then they run one at a time in order and report done/total', async () => {
    const runner = new JobRunner();
    const order: string[] = [];
    const work = (name: string) => async (p: { setTotal(n: number): void; advance(n: number): void }) => {
      order.push(`${name} start`);
      p.setTotal(3);
      for (let i = 0; i < 3; i++) {
        await tick();
        p.advance(1);
      }
      order.push(`${name} end`);
    };
    const a = runner.enqueue('test', 'a', work('a'));
    const b = runner.enqueue('test', 'b', work('b'));
    expect(runner.get(b.id)!.state).toBe('queued');
    await runner.idle();
    expect(order).toEqual(['a start', 'a end', 'b start', 'b end']);
    expect(runner.get(a.id)).toMatchObject({ state: 'done', done: 3, total: 3 });
    expect(runner.get(b.id)).toMatchObject({ state: 'done', done: 3, total: 3 });
  });

  it('when a job of the same scope is still waiting, then a new request reuses it instead of queueing another', async () => {
    const runner = new JobRunner();
    let runs = 0;
    const slow = async () => {
      await tick();
      runs++;
    };
    const first = runner.enqueue('rescore-all', 'first', slow, { coalesceKey: 'all' });
    const second = runner.enqueue('rescore-all', 'second', slow, { coalesceKey: 'all' });
    const third = runner.enqueue('rescore-all', 'third', slow, { coalesceKey: 'all' });
    expect(second.id).not.toBe(first.id); // the first is already running: its data may be old
    expect(third.id).toBe(second.id);
    await runner.idle();
    expect(runs).toBe(2);
  });

  it('when a job throws, then it is failed with the message and the next job still runs', async () => {
    const runner = new JobRunner();
    const bad = runner.enqueue('test', 'bad', async () => {
      throw new Error('disk full');
    });
    const good = runner.enqueue('test', 'good', async (p) => {
      p.setTotal(1);
      p.advance(1);
    });
    const log = console.error;
    console.error = () => {};
    try {
      await runner.idle();
    } finally {
      console.error = log;
    }
    expect(runner.get(bad.id)).toMatchObject({ state: 'failed', error: 'disk full' });
    expect(runner.get(good.id)!.state).toBe('done');
  });

  it('when the app stops, then the running job sees aborted and queued ones are failed', async () => {
    const runner = new JobRunner();
    const long = runner.enqueue('test', 'long', async (p) => {
      p.setTotal(1000);
      while (!p.aborted) {
        await tick();
        p.advance(1);
      }
    });
    const queued = runner.enqueue('test', 'queued', async () => {});
    await tick();
    await runner.stop();
    expect(runner.get(long.id)!.state).toBe('failed');
    expect(runner.get(queued.id)).toMatchObject({ state: 'failed', error: 'The server stopped before this job ran' });
  });
});
