import { EventEmitter } from 'node:events';
import type { Origin } from '../../src/origins/types.js';

/**
 * Wraps an origin so reads wait until the test opens the gate, and counts them. Emits 'read'
 * when a read starts, so tests synchronise on events rather than on time. With
 * `identify: true` identifications wait at the gate too, and emit 'identify'.
 */
export function gatedOrigin(inner: Origin, gates: { identify?: boolean } = {}) {
  const events = new EventEmitter();
  let open!: () => void;
  let gate = new Promise<void>((resolve) => (open = resolve));
  const state = { reads: 0 };
  const origin: Origin = {
    name: `gated:${inner.name}`,
    async identify(path, signal) {
      if (gates.identify) {
        events.emit('identify', path);
        await gate;
      }
      return inner.identify(path, signal);
    },
    async read(path, signal) {
      state.reads += 1;
      events.emit('read', path);
      await gate;
      return inner.read(path, signal);
    },
  };
  return {
    origin,
    events,
    state,
    /** Lets every waiting and future read through. */
    release: () => open(),
    /** Closes the gate again for the next test. */
    reset: () => {
      state.reads = 0;
      gate = new Promise<void>((resolve) => (open = resolve));
    },
  };
}

/** Resolves when `emitter` has emitted `event` `count` times (counting from now). */
export function eventCount(emitter: EventEmitter, event: string, count: number): Promise<void> {
  return new Promise((resolve) => {
    let seen = 0;
    const on = () => {
      seen += 1;
      if (seen === count) {
        emitter.off(event, on);
        resolve();
      }
    };
    emitter.on(event, on);
  });
}
