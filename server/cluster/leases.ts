/**
 * Room ownership in cluster mode (docs/decisions/0009-several-nodes.md). A node serves a live
 * room only while it holds the room's lease in Redis: key `fretcall:lease:<roomId>`, value
 * `<nodeId>|<fence>|<address>`, set with NX and a TTL of a few seconds, renewed every second by a
 * compare-and-extend script, deleted by compare-and-delete when the node lets go.
 *
 * Redis decides who takes a room; the database keeps it safe. Taking a room raises its fence in
 * the database, and every write batch for the room checks the fence in its own transaction
 * (app/rooms/store.server.ts), so a node that lost its lease (paused, partitioned, slow, or Redis
 * lost the key) cannot write for the room again, whatever Redis says. That is also why an owner
 * keeps serving while Redis is down and simply sets its lease again when Redis is back.
 */
import type { Redis } from "ioredis";
import type { RedisLog } from "./redis";

export const LEASE_TTL_MS = 3_000;
export const RENEW_EVERY_MS = 1_000;

export interface LeaseOwner {
  nodeId: string;
  fence: number;
  /** host:port where the owner takes forwarded sockets. */
  address: string;
}

export const leaseKey = (roomId: string) => `fretcall:lease:${roomId}`;
export const leaseValue = (o: LeaseOwner) => `${o.nodeId}|${o.fence}|${o.address}`;

/** The owner a lease names; null for a value that is not a lease (nothing to trust in it). */
export function parseLease(value: string | null): LeaseOwner | null {
  const m = value === null ? null : /^([^|]+)\|(\d+)\|([^|]+)$/.exec(value);
  return m ? { nodeId: m[1]!, fence: Number(m[2]), address: m[3]! } : null;
}

/** Where the fencing numbers live (the database: RoomStore.fenceOf / advanceFence). */
export interface FenceStore {
  fenceOf(roomId: string): Promise<number>;
  advanceFence(roomId: string, seen: number, nodeId: string): Promise<boolean>;
}

/**
 * Why a room cannot be served here now; the socket is closed with `closeCode` so the client
 * reconnects (through the load balancer, to the owner): 1012 "service restart" when another node
 * has the room, 1013 "try again later" when Redis cannot say.
 */
export class RoomElsewhere extends Error {
  constructor(
    message: string,
    readonly closeCode: 1012 | 1013,
    readonly owner: LeaseOwner | null = null,
  ) {
    super(message);
  }
}

/** Extends the lease if it is still this value; sets it again if it is gone. 1 extended, 2 set again, 0 someone else's. */
const RENEW = `
local v = redis.call('GET', KEYS[1])
if v == ARGV[1] then redis.call('PEXPIRE', KEYS[1], ARGV[2]) return 1 end
if not v then redis.call('SET', KEYS[1], ARGV[1], 'PX', ARGV[2]) return 2 end
return 0`;
/** Deletes the lease only if it is still this value. */
const RELEASE = `if redis.call('GET', KEYS[1]) == ARGV[1] then return redis.call('DEL', KEYS[1]) end return 0`;

interface Held {
  value: string;
  fence: number;
}

export class Leases {
  private readonly held = new Map<string, Held>();
  private timer: NodeJS.Timeout | null = null;
  private renewing = false;
  /** Told when this node has lost a room (another node has it now): drop it and close its sockets. */
  onLost: (roomId: string) => void = () => {};

  constructor(
    private readonly redis: Redis,
    private readonly self: { nodeId: string; address: string },
    private readonly fences: FenceStore,
    private readonly log: RedisLog,
    readonly ttlMs = LEASE_TTL_MS,
    private readonly renewEveryMs = RENEW_EVERY_MS,
  ) {}

  get nodeId() {
    return this.self.nodeId;
  }

  holds(roomId: string) {
    return this.held.has(roomId);
  }

  /** The fence this node holds the room with, if it does. */
  fenceOf(roomId: string) {
    return this.held.get(roomId)?.fence;
  }

  /** Who holds the room's lease now (null: nobody). Rejects while Redis is unreachable. */
  async owner(roomId: string): Promise<LeaseOwner | null> {
    return parseLease(await this.redis.get(leaseKey(roomId)));
  }

  /**
   * Takes the room for this node and gives its fence: the lease in Redis first (only one node
   * gets it), then the fence raised in the database from the value read before, so a node that
   * read an old fence gives up instead of raising it. Rejects with RoomElsewhere if another node
   * holds the room or Redis cannot say.
   */
  async claim(roomId: string): Promise<number> {
    const mine = this.held.get(roomId);
    if (mine) return mine.fence;
    const key = leaseKey(roomId);
    for (let attempt = 0; attempt < 3; attempt++) {
      const seen = await this.fences.fenceOf(roomId);
      const value = leaseValue({ ...this.self, fence: seen + 1 });
      const set = await this.ask(() => this.redis.set(key, value, "PX", this.ttlMs, "NX"));
      if (set !== "OK") {
        const owner = parseLease(await this.ask(() => this.redis.get(key)));
        // This node's own lease from a copy it let go while Redis was away: free it and try again.
        if (owner?.nodeId === this.self.nodeId) await this.ask(() => this.redis.eval(RELEASE, 1, key, leaseValue(owner)));
        else if (owner) throw new RoomElsewhere(`node ${owner.nodeId} has this room`, 1012, owner);
        continue;
      }
      const advanced = await this.fences.advanceFence(roomId, seen, this.self.nodeId).catch(async (error: unknown) => {
        // The database could not say (busy past its timeout, unreachable): let go, the client tries again.
        await this.redis.eval(RELEASE, 1, key, value).catch(() => {});
        throw new RoomElsewhere(`the room's fence could not be raised: ${error instanceof Error ? error.message : error}`, 1013);
      });
      if (advanced) {
        this.held.set(roomId, { value, fence: seen + 1 });
        this.startRenewing();
        return seen + 1;
      }
      // Another node raised the fence between the read and the lease: let go and read again.
      await this.ask(() => this.redis.eval(RELEASE, 1, key, value));
    }
    throw new RoomElsewhere("the room changed hands while this node was taking it", 1012);
  }

  /** Lets the room go: no more renewals, and the lease deleted if it is still this node's (else it lapses). */
  async release(roomId: string) {
    const mine = this.held.get(roomId);
    if (!mine) return;
    this.held.delete(roomId);
    await this.redis.eval(RELEASE, 1, leaseKey(roomId), mine.value).catch(() => {});
  }

  /** Every held room's lease, extended (or set again after Redis lost it) in one round trip. */
  private async renew() {
    if (this.renewing || this.held.size === 0) return;
    this.renewing = true;
    const rooms = [...this.held.entries()];
    try {
      const pipeline = this.redis.pipeline();
      for (const [roomId, h] of rooms) pipeline.eval(RENEW, 1, leaseKey(roomId), h.value, this.ttlMs);
      const results = (await pipeline.exec()) ?? [];
      for (const [i, [roomId, h]] of rooms.entries()) {
        const [error, answer] = results[i] ?? [new Error("no reply")];
        if (error || this.held.get(roomId) !== h) continue;
        if (answer === 2) await this.reestablished(roomId, h);
        else if (answer !== 1) this.lose(roomId, "another node holds its lease");
      }
    } catch {
      // Redis is unreachable: keep serving (the fence keeps every write safe) and try again next time.
    } finally {
      this.renewing = false;
    }
  }

  /** The lease was gone and is set again: still ours only if no node raised the fence meanwhile. */
  private async reestablished(roomId: string, h: Held) {
    if ((await this.fences.fenceOf(roomId)) === h.fence) {
      this.log.info(`lease on room ${roomId} set again (fence ${h.fence})`);
      return;
    }
    await this.redis.eval(RELEASE, 1, leaseKey(roomId), h.value).catch(() => {});
    this.lose(roomId, "its fence moved on while the lease was gone");
  }

  private lose(roomId: string, why: string) {
    if (!this.held.delete(roomId)) return;
    this.log.warn(`lost room ${roomId}: ${why}`);
    this.onLost(roomId);
  }

  /** Runs a Redis command for a claim; an unreachable Redis becomes "try again later". */
  private async ask<T>(command: () => Promise<T>): Promise<T> {
    try {
      return await command();
    } catch (error) {
      throw new RoomElsewhere(`Redis cannot say who has this room: ${error instanceof Error ? error.message : error}`, 1013);
    }
  }

  /** Renews every held lease every RENEW_EVERY_MS (started by the first claim). */
  startRenewing() {
    if (this.timer) return;
    this.timer = setInterval(() => void this.renew(), this.renewEveryMs);
    this.timer.unref();
  }

  /** Stops renewing (tests make a node's leases lapse this way, as a pause would). */
  stopRenewing() {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
  }

  /** A graceful stop: every lease deleted, so other nodes take the rooms at once rather than after the TTL. */
  async close() {
    this.stopRenewing();
    await Promise.all([...this.held.keys()].map((roomId) => this.release(roomId)));
  }
}
