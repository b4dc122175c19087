/**
 * The shared callback queue waits for the job's end to be recorded before it delivers (a
 * callback is queued inside its job, a moment before BullMQ records the end), without spending
 * an attempt on the wait. Real redis-server; the delivery is a stand-in the test observes.
 */
import { EventEmitter, once } from 'node:events';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CallbackSender } from '../../src/ingest/callback-sender.js';
import { redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';

describe.skipIf(!redisBinary)('callbacks on the shared queue', () => {
  let server: RedisProcess;
  let sender: CallbackSender;
  const deliveries: string[] = [];
  const asked = new EventEmitter();
  let recorded = false;

  beforeAll(async () => {
    server = await startRedis();
    sender = new CallbackSender(
      async (url, body) => {
        deliveries.push(`${url} ${body}`);
        return 204;
      },
      // One attempt: a wait that spent it would give up instead of delivering.
      { attempts: 1, baseDelayMs: 20, shared: { url: server.url, prefix: 'cb-sender:q', closeMs: 2000, lockMs: 5000 } },
    );
    sender.ended = async (id) => {
      asked.emit('asked', id);
      return recorded;
    };
  });
  afterAll(async () => {
    await sender?.close();
    await server?.stop();
  });

  it('delivers only once the job\'s end is recorded, and the wait spends no attempt', async () => {
    let asks = 0;
    const askedTwice = new Promise<void>((resolve) => asked.on('asked', (id: string) => id === 'j1' && ++asks === 2 && resolve()));
    await sender.send('http://127.0.0.1:9/hooks', { job: 'j1', state: 'done', finishedAt: '2026-12-02T00:00:00.000Z' });
    await askedTwice; // delayed once already, asked again
    expect(deliveries).toEqual([]);
    const delivered = once(sender, 'delivered');
    recorded = true;
    expect(await delivered).toEqual(['j1', 204]);
    expect(deliveries).toEqual(['http://127.0.0.1:9/hooks {"job":"j1","state":"done","finishedAt":"2026-12-02T00:00:00.000Z"}']);
  });
});
