import WebSocket from "ws";
import type { ServerMessage } from "~/game/protocol";

/** A scripted stage or pad: records every server message and waits for the ones a test expects. */
export class TestSocket {
  readonly messages: ServerMessage[] = [];
  closed: { code: number; reason: string } | null = null;
  private waiters: { match: (m: ServerMessage) => boolean; resolve: (m: ServerMessage) => void }[] = [];
  private closeWaiters: ((c: { code: number }) => void)[] = [];

  private constructor(readonly ws: WebSocket) {
    ws.on("message", (data) => {
      const m = JSON.parse(String(data)) as ServerMessage;
      this.messages.push(m);
      this.waiters = this.waiters.filter((w) => (w.match(m) ? (w.resolve(m), false) : true));
    });
    ws.on("close", (code, reason) => {
      this.closed = { code, reason: String(reason) };
      for (const w of this.closeWaiters) w({ code });
    });
  }

  static open(base: string, origin = base, headers: Record<string, string> = {}): Promise<TestSocket> {
    const ws = new WebSocket(`${base.replace(/^http/, "ws")}/ws`, { origin, headers });
    return new Promise((resolve, reject) => {
      ws.once("open", () => resolve(new TestSocket(ws)));
      ws.once("error", reject);
      ws.once("unexpected-response", (_req, res) => reject(new Error(`upgrade refused: ${res.statusCode}`)));
    });
  }

  send(message: unknown) {
    this.ws.send(typeof message === "string" ? message : JSON.stringify(message));
  }

  /** The next message (already received since `from`, or still to come) that matches. */
  next<T extends ServerMessage["type"]>(
    type: T,
    where: (m: Extract<ServerMessage, { type: T }>) => boolean = () => true,
    from = 0,
    timeoutMs = 10_000,
  ): Promise<Extract<ServerMessage, { type: T }>> {
    const match = (m: ServerMessage) => m.type === type && where(m as Extract<ServerMessage, { type: T }>);
    const seen = this.messages.slice(from).find(match);
    if (seen) return Promise.resolve(seen as Extract<ServerMessage, { type: T }>);
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`no "${type}" message within ${timeoutMs} ms`)), timeoutMs);
      this.waiters.push({
        match,
        resolve: (m) => {
          clearTimeout(timer);
          resolve(m as Extract<ServerMessage, { type: T }>);
        },
      });
    });
  }

  waitClose(timeoutMs = 5_000): Promise<{ code: number }> {
    if (this.closed) return Promise.resolve(this.closed);
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error("socket did not close")), timeoutMs);
      this.closeWaiters.push((c) => {
        clearTimeout(timer);
        resolve(c);
      });
    });
  }

  close() {
    this.ws.close();
  }
}
