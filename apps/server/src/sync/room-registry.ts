/**
 * Open rooms by name. One Room per name at a time: a peer arriving while its room unloads waits for
 * the unload to finish (at most the unload timeout) and then opens a fresh Room (which loads again
 * from the store). At most `maxLoadedDocuments` rooms are held: idle ones (nobody connected, or only
 * an opening request's lease) are unloaded least recently used first to make room; when none is idle,
 * a new room is refused (RoomError 'too-many-documents').
 */
import { Room, type RoomDeps, type RoomPeer, type RoomState } from './room.js';
import { RoomError, within } from './room-state.js';

export interface RegistryDeps extends RoomDeps {
  maxLoadedDocuments: number;
  /** A room nobody has open stays loaded this long (0: unloaded at once). */
  roomIdleMs: number;
}

export class RoomRegistry {
  private readonly rooms = new Map<string, Room>();
  /** Rooms kept loaded after their last peer left, with the timer that unloads them. */
  private readonly lingering = new Map<Room, NodeJS.Timeout>();

  constructor(private readonly deps: RegistryDeps) {}

  /** Joins `peer` to the room (creating and loading it if needed); resolves once the room is open. */
  async join(name: string, docId: string, peer: RoomPeer): Promise<Room> {
    for (;;) {
      let room = this.rooms.get(name);
      if (room === undefined || room.ended) {
        this.makeSpace();
        room = new Room(name, docId, this.deps);
        this.rooms.set(name, room);
        this.whenLoaded(room);
      }
      if (room.state === 'unloading') {
        const ms = this.deps.unloadTimeoutMs;
        await within(room.settled, ms, () => new RoomError('unload-timeout', `the document was still closing after ${ms} ms; try again`));
        continue;
      }
      this.stopLingering(room);
      room.peers.add(peer);
      room.lastUsed = performance.now();
      try {
        await room.ready;
      } catch (error) {
        room.peers.delete(peer);
        if (this.rooms.get(name) === room) this.rooms.delete(name);
        throw error;
      }
      return room;
    }
  }

  /** Takes `peer` out; the last one out starts the unload (or the idle wait before it). */
  leave(room: Room, peer: RoomPeer): void {
    room.peers.delete(peer);
    room.lastUsed = performance.now();
    if (room.peers.size === 0 && room.state === 'open') this.idle(room);
  }

  /** Unloads every room (server shutdown). */
  async closeAll(): Promise<void> {
    for (const timer of this.lingering.values()) clearTimeout(timer);
    this.lingering.clear();
    await Promise.all(
      [...this.rooms.values()].map(async (room) => {
        await room.ready.catch(() => {}); // a loading room settles first (at most its load timeout)
        if (room.state === 'open' || room.state === 'unloading') await this.unload(room);
      }),
    );
  }

  /** The room of that name when it is open on this node. */
  ready(name: string): Room | undefined {
    const room = this.rooms.get(name);
    return room?.state === 'open' ? room : undefined;
  }

  /** The relay reconnected with its subscriptions renewed: every room loading or open re-reads the log. */
  relayReconnected(): void {
    for (const room of this.rooms.values()) room.relayReconnected();
  }

  stats(): { rooms: number; byState: Record<RoomState, number> } {
    const byState: Record<RoomState, number> = { loading: 0, open: 0, unloading: 0, closed: 0, failed: 0 };
    for (const room of this.rooms.values()) byState[room.state]++;
    return { rooms: this.rooms.size, byState };
  }

  /**
   * Below the limit, nothing to do. At it: unload the least recently used idle room (its unload runs
   * on; the count drops at once, as the name is free for a new room). No idle room: refuse.
   */
  private makeSpace(): void {
    if (this.loaded() < this.deps.maxLoadedDocuments) return;
    let oldest: Room | null = null;
    for (const room of this.rooms.values()) {
      if (room.state !== 'open' || ![...room.peers].every((p) => p.lease === true)) continue;
      if (oldest === null || room.lastUsed < oldest.lastUsed) oldest = room;
    }
    if (oldest === null) {
      throw new RoomError('too-many-documents', `this node has ${this.deps.maxLoadedDocuments} documents open, none idle; try again later`);
    }
    this.deps.logger.warn({ room: oldest.name, loaded: this.loaded() }, 'loaded-document limit reached: unloading the least recently used idle room');
    this.stopLingering(oldest);
    void this.unload(oldest);
  }

  /** Rooms loading or open (an unloading room is on its way out). */
  private loaded(): number {
    let n = 0;
    for (const room of this.rooms.values()) if (room.state === 'loading' || room.state === 'open') n++;
    return n;
  }

  private idle(room: Room): void {
    if (this.deps.roomIdleMs <= 0) return void this.unload(room);
    if (this.lingering.has(room)) return;
    const timer = setTimeout(() => {
      this.lingering.delete(room);
      if (room.peers.size === 0 && room.state === 'open') void this.unload(room);
    }, this.deps.roomIdleMs);
    timer.unref();
    this.lingering.set(room, timer);
  }

  private stopLingering(room: Room): void {
    const timer = this.lingering.get(room);
    if (timer === undefined) return;
    clearTimeout(timer);
    this.lingering.delete(room);
  }

  private whenLoaded(room: Room): void {
    // Everyone may have left while it loaded.
    room.ready.then(
      () => {
        if (room.peers.size === 0) this.idle(room);
      },
      () => {
        if (this.rooms.get(room.name) === room) this.rooms.delete(room.name);
      },
    );
  }

  private unload(room: Room): Promise<void> {
    return room.unload().then(() => {
      if (this.rooms.get(room.name) === room) this.rooms.delete(room.name);
    });
  }
}
