import { EventEmitter, once } from 'node:events';
import { connect, createServer, type Server, type Socket } from 'node:net';

/**
 * A TCP relay on 127.0.0.1 in front of a local server (Redis) that can hold some connections:
 * those whose first bytes match `hold` wait, unanswered, until release(); the others are
 * relayed at once. cut() drops every relayed connection, as a network fault would. Events:
 * 'held' (a connection waits) and 'relayed'.
 */
export class TcpGate extends EventEmitter {
  private readonly server: Server;
  private readonly live = new Set<Socket>();
  private waiting: Array<{ socket: Socket; first: Buffer }> = [];
  private hold: RegExp | undefined;

  private constructor(private readonly targetPort: number) {
    super();
    this.server = createServer((socket) => {
      this.live.add(socket);
      socket.on('close', () => this.live.delete(socket));
      socket.on('error', () => socket.destroy());
      socket.once('data', (first: Buffer) => {
        socket.pause();
        if (this.hold?.test(first.toString('latin1'))) {
          this.waiting.push({ socket, first });
          this.emit('held');
        } else this.relay(socket, first);
      });
    });
  }

  static async start(targetPort: number): Promise<TcpGate> {
    const gate = new TcpGate(targetPort);
    gate.server.listen(0, '127.0.0.1');
    await once(gate.server, 'listening');
    return gate;
  }

  get url(): string {
    const address = this.server.address();
    return `redis://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}`;
  }

  /** From now on, connections whose first bytes match `pattern` are held. */
  holdMatching(pattern: RegExp | undefined): void {
    this.hold = pattern;
  }

  /** Relays the held connections and holds no more. */
  release(): void {
    this.hold = undefined;
    const waiting = this.waiting;
    this.waiting = [];
    for (const { socket, first } of waiting) this.relay(socket, first);
  }

  /** Drops every connection (relayed or held). */
  cut(): void {
    for (const socket of this.live) socket.destroy();
    this.waiting = [];
  }

  async close(): Promise<void> {
    this.cut();
    this.server.close();
    await once(this.server, 'close');
  }

  private relay(socket: Socket, first: Buffer): void {
    const upstream = connect(this.targetPort, '127.0.0.1');
    this.live.add(upstream);
    upstream.on('close', () => {
      this.live.delete(upstream);
      socket.destroy();
    });
    upstream.on('error', () => upstream.destroy());
    socket.on('close', () => upstream.destroy());
    upstream.write(first);
    socket.pipe(upstream);
    upstream.pipe(socket);
    socket.resume();
    this.emit('relayed');
  }
}
