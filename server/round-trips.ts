/**
 * The server times each seated pad's round trips itself, with WebSocket-level pings. A browser
 * answers them in its network stack, out of reach of page scripts, so no page can make its link
 * look slower than it is (its own `ping` reports can say anything; they set only its clock
 * offset); a client of its own making could hold its pongs back, and widens its window by that,
 * up to MAX_UPLINK_MS. The figures bound how early a claimed tap may be (app/game/clock.ts, uplinkBound).
 *
 * A whole school's pads are pinged, so this is on the hub's hottest path (profiled under
 * bench/live.ts): one timer for all sockets of an interval, random payloads drawn from a pool, the
 * pings awaiting their pong in two short arrays, and a seat pinged less often once its window is
 * full or its link steady (app/game/clock.ts, pingFactor). A ping rides along in the same write as
 * a frame the socket is sent anyway when one is nearly due (pingIfDue): each write on its own is a
 * system call, and those were most of the cost.
 */
import { randomFillSync } from "node:crypto";
import type { WebSocket } from "ws";
import type { RoundTrip } from "~/game/clock";

/** Pings awaiting their pong; older ones are forgotten (a pong that late is not worth a sample). */
const OUTSTANDING = 8;
/** Payload bytes: 48 random bits, read back as one number (a double holds them exactly). */
const PAYLOAD_BYTES = 6;
/** One random fill serves this many pings. */
const POOL_PINGS = 1024;
/**
 * The sockets pinged at one interval are split in this many slices, pinged in turn, so a school's
 * pings (and the pongs that answer them) never come in one burst.
 */
const SLICES = 20;
/**
 * A socket at the full rate asks for its seat's pace every this many round trips (each ask sorts
 * the window), so a new socket times this many at the full rate first even on a seat whose window
 * is full or steady: a pad that reconnected may be on another network now. A slower one asks on
 * every round trip, so one jump (or a window no longer full) brings the full rate back at once.
 */
const FULL_RATE_CHECK_EVERY = 5;
/**
 * A ping goes out once this share of its interval has passed since the last one, whether its slice's
 * turn or another frame's write comes first; so pings stay between 0.75 and 1.75 intervals apart.
 */
const DUE_SHARE = 0.75;

const pool = Buffer.alloc(PAYLOAD_BYTES * POOL_PINGS);
let poolUsed = POOL_PINGS;

/** A fresh unpredictable payload (a pong cannot be sent ahead of its ping) and its key. */
function payload(): { bytes: Buffer; key: number } {
  if (poolUsed === POOL_PINGS) {
    randomFillSync(pool);
    poolUsed = 0;
  }
  const at = PAYLOAD_BYTES * poolUsed++;
  // A copy: the pool is refilled while a ping may still wait in a slow socket's buffer.
  const bytes = Buffer.from(pool.subarray(at, at + PAYLOAD_BYTES));
  return { bytes, key: bytes.readUIntLE(0, PAYLOAD_BYTES) };
}

/** Every timer of one interval, pinged a slice at a time by a single interval timer (none while empty). */
class Schedule {
  private readonly slices = Array.from({ length: SLICES }, () => new Set<RoundTripTimer>());
  private timer: NodeJS.Timeout | null = null;
  private turn = 0;
  private size = 0;

  constructor(readonly everyMs: number) {}

  add(t: RoundTripTimer) {
    // At a random slice, so sockets that connect together are not pinged together.
    this.slices[Math.floor(Math.random() * SLICES)]!.add(t);
    if (this.size++ === 0) {
      this.timer = setInterval(() => {
        for (const each of this.slices[this.turn++ % SLICES]!) each.pingIfDue();
      }, this.everyMs / SLICES);
      this.timer.unref();
    }
  }

  delete(t: RoundTripTimer) {
    if (!this.slices.some((s) => s.delete(t))) return;
    if (--this.size === 0 && this.timer) {
      clearInterval(this.timer);
      this.timer = null;
    }
  }
}

const schedules = new Map<number, Schedule>();
const scheduleFor = (everyMs: number) => schedules.get(everyMs) ?? schedules.set(everyMs, new Schedule(everyMs)).get(everyMs)!;

export class RoundTripTimer {
  /** Keys of the pings awaiting their pong, oldest first, and performance.now() when each was sent. */
  private readonly keys: number[] = [];
  private readonly sentAt: number[] = [];
  private schedule: Schedule;
  /** Round trips timed on this socket. */
  private timed = 0;
  /** performance.now() of the last ping. */
  private lastPingAt = -Infinity;

  constructor(
    private readonly ws: WebSocket,
    /** Whether the socket holds a seat now (only seats are timed). */
    private readonly seated: () => boolean,
    record: (trip: RoundTrip) => void,
    /** How many times less often than `everyMs` the seat is to be pinged now (app/game/clock.ts, pingFactor). */
    pace: () => number,
    everyMs: number,
  ) {
    const full = (this.schedule = scheduleFor(everyMs));
    ws.on("pong", (data: Buffer) => {
      if (data.length !== PAYLOAD_BYTES) return;
      const i = this.keys.indexOf(data.readUIntLE(0, PAYLOAD_BYTES));
      if (i < 0) return;
      const ms = performance.now() - this.sentAt[i]!;
      this.keys.splice(i, 1);
      this.sentAt.splice(i, 1);
      record({ at: Date.now(), ms });
      if (this.schedule !== full || ++this.timed % FULL_RATE_CHECK_EVERY === 0) this.move(scheduleFor(everyMs * pace()));
    });
    full.add(this);
    ws.on("close", () => this.schedule.delete(this));
  }

  private move(schedule: Schedule) {
    if (schedule === this.schedule || this.ws.readyState !== this.ws.OPEN) return;
    this.schedule.delete(this);
    this.schedule = schedule;
    schedule.add(this);
  }

  /**
   * Pings if one is due: at its slice's turn, and just before any other write to the socket goes
   * out, so the ping shares that write's system call (and is timed from when it is written).
   */
  pingIfDue() {
    if (performance.now() - this.lastPingAt >= DUE_SHARE * this.schedule.everyMs) this.ping();
  }

  /** Pings now (also called as a seat is taken, so its first answer has a figure soon). */
  ping() {
    if (!this.seated() || this.ws.readyState !== this.ws.OPEN) return;
    const { bytes, key } = payload();
    this.keys.push(key);
    this.sentAt.push((this.lastPingAt = performance.now()));
    if (this.keys.length > OUTSTANDING) {
      this.keys.shift();
      this.sentAt.shift();
    }
    this.ws.ping(bytes);
  }
}
