import net from "node:net";
import { performance } from "node:perf_hooks";

export type Direction = "up" | "down";

/** How long a chunk of bytes sent now takes across the link (up: pad → server). */
export type LinkDelay = (direction: Direction) => number;

/**
 * A TCP relay in front of the test server that delays what crosses it, as a classroom network
 * would, on loopback. Each direction keeps its order: a chunk held up holds up what follows it,
 * as a TCP retransmission does. Clients connect to `url` instead of the server's.
 */
export class DelayedLink {
  private readonly open = new Set<net.Socket>();
  /** Extra delay for the next chunk going up (a frame caught in a retransmission). */
  private nextUpHold = 0;

  private constructor(
    private readonly server: net.Server,
    readonly url: string,
    public delay: LinkDelay,
  ) {}

  static async open(targetPort: number, delay: LinkDelay): Promise<DelayedLink> {
    const server = net.createServer();
    await new Promise<void>((done) => server.listen(0, "127.0.0.1", done));
    const link = new DelayedLink(server, `http://localhost:${(server.address() as net.AddressInfo).port}`, delay);
    server.on("connection", (pad) => {
      const target = net.connect(targetPort, "127.0.0.1");
      for (const s of [pad, target]) {
        s.setNoDelay(true);
        link.open.add(s);
        s.on("close", () => link.open.delete(s));
      }
      link.relay(pad, target, "up");
      link.relay(target, pad, "down");
    });
    return link;
  }

  /** The next chunk the pad sends is held up `ms` more (and so is what follows it). */
  holdNextUp(ms: number) {
    this.nextUpHold = ms;
  }

  private relay(from: net.Socket, to: net.Socket, direction: Direction) {
    const queue: { due: number; chunk: Buffer | null }[] = [];
    let timer: NodeJS.Timeout | null = null;
    const drain = () => {
      timer = null;
      while (queue.length > 0 && queue[0]!.due <= performance.now()) {
        const { chunk } = queue.shift()!;
        if (to.destroyed) return;
        // null: the sender closed; pass the close on after what it sent before.
        if (chunk === null) to.destroy();
        else to.write(chunk);
      }
      if (queue.length > 0) timer = setTimeout(drain, queue[0]!.due - performance.now());
    };
    const push = (chunk: Buffer | null) => {
      let extra = 0;
      if (direction === "up" && chunk !== null) [extra, this.nextUpHold] = [this.nextUpHold, 0];
      const last = queue.at(-1)?.due ?? 0;
      queue.push({ due: Math.max(performance.now() + this.delay(direction) + extra, last), chunk });
      if (timer === null) timer = setTimeout(drain, queue[0]!.due - performance.now());
    };
    from.on("data", (chunk: Buffer) => push(chunk));
    from.on("close", () => push(null));
    from.on("error", () => from.destroy());
  }

  async close() {
    for (const s of this.open) s.destroy();
    await new Promise<void>((done) => this.server.close(() => done()));
  }
}
