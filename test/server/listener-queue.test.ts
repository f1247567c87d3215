/**
 * The readings listeners' queue (server/telemetry/listener-queue.ts): every batch reaches every listener once, in
 * the order accepted, with events (a gateway's death) after the batches before them; it is bounded (`full`); a
 * failing listener does not stop the others; and a long backlog is handed on over several event-loop turns.
 */
import { createLogger } from '../../server/logger';
import { ListenerQueue } from '../../server/telemetry/listener-queue';
import type { AcceptedReading } from '../../server/telemetry/types';

const reading = (engineId: number, ts: number): AcceptedReading => ({ engineId, channel: 'coolant_temp', ts, value: 80, quality: 0 });
const log = createLogger('silent');
/** Resolves after the queue's pending turns (each slice is one setImmediate). */
const turn = () => new Promise<void>((resolve) => setImmediate(resolve));

describe('ListenerQueue', () => {
  test('batches and events reach the listeners in order, each once; nothing runs in the caller’s turn', async () => {
    const seen: string[] = [];
    const q = new ListenerQueue([(b) => seen.push(`a:${b.map((r) => r.ts).join(',')}`), (b) => seen.push(`b:${b.length}`)], log);
    q.push([reading(1, 1), reading(1, 2)]);
    q.then(() => seen.push('lost 1'));
    q.push([reading(2, 3)]);
    expect(seen).toEqual([]);
    expect(q.backlog).toBe(3);
    while (q.backlog > 0 || seen.length < 5) await turn();
    expect(seen).toEqual(['a:1,2', 'b:2', 'lost 1', 'a:3', 'b:1']);
  });

  test('full at its bound; drainNow hands everything on at once', () => {
    const got: number[] = [];
    const q = new ListenerQueue([(b) => got.push(...b.map((r) => r.ts))], log, 10, 4);
    q.push([reading(1, 1), reading(1, 2)]);
    expect(q.full).toBe(false);
    q.push([reading(1, 3), reading(1, 4)]);
    expect(q.full).toBe(true);
    q.drainNow();
    expect(got).toEqual([1, 2, 3, 4]);
    expect(q.full).toBe(false);
    expect(q.backlog).toBe(0);
  });

  test('a failing listener does not stop the others or later batches', () => {
    const got: number[] = [];
    const q = new ListenerQueue(
      [
        (b) => {
          if (b[0].ts === 1) throw new Error('listener fault');
        },
        (b) => got.push(b[0].ts),
      ],
      log,
    );
    q.push([reading(1, 1)]);
    q.push([reading(1, 2)]);
    q.drainNow();
    expect(got).toEqual([1, 2]);
  });

  test('a backlog longer than one slice goes over several turns, in order', async () => {
    const got: number[] = [];
    let turns = 0;
    // each batch takes about a millisecond: a 2 ms slice hands on a few per turn
    const q = new ListenerQueue(
      [
        (b) => {
          const until = performance.now() + 1;
          while (performance.now() < until);
          got.push(b[0].ts);
        },
      ],
      log,
      2,
    );
    for (let i = 0; i < 40; i++) q.push([reading(1, i)]);
    while (q.backlog > 0) {
      await turn();
      turns++;
    }
    expect(got).toEqual(Array.from({ length: 40 }, (_, i) => i));
    expect(turns).toBeGreaterThan(1);
  });
});
