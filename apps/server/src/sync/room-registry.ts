/**
 * Open rooms by name. One Room per name at a time: a peer arriving while its room unloads waits for
 * the unload to finish and then opens a fresh Room (which loads again from the store).
 */
import { Room, type RoomDeps, type RoomPeer, type RoomState } from './room.js';

export class RoomRegistry {
  private readonly rooms = new Map<string, Room>();

  constructor(private readonly deps: RoomDeps) {}

  /** Joins `peer` to the room (creating and loading it if needed); resolves once the room is ready. */
  async join(name: string, docId: string, peer: RoomPeer): Promise<Room> {
    for (;;) {
      let room = this.rooms.get(name);
      if (room === undefined || room.state === 'gone') {
        room = new Room(name, docId, this.deps);
        this.rooms.set(name, room);
        this.whenLoaded(room);
      }
      if (room.state === 'unloading') {
        await room.unload();
        continue;
      }
      room.peers.add(peer);
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

  /** Takes `peer` out; the last one out starts the unload. */
  leave(room: Room, peer: RoomPeer): void {
    room.peers.delete(peer);
    if (room.peers.size === 0 && room.state === 'ready') this.unload(room);
  }

  /** Unloads every room (server shutdown). */
  async closeAll(): Promise<void> {
    await Promise.all([...this.rooms.values()].map((room) => this.unload(room)));
  }

  /** The room of that name when it is open and ready on this node. */
  ready(name: string): Room | undefined {
    const room = this.rooms.get(name);
    return room?.state === 'ready' ? room : undefined;
  }

  /** Runs `fn` for each ready room (periodic or reconnect catch-up). */
  forEachReady(fn: (room: Room) => void): void {
    for (const room of this.rooms.values()) if (room.state === 'ready') fn(room);
  }

  stats(): { rooms: number; byState: Record<RoomState, number> } {
    const byState: Record<RoomState, number> = { loading: 0, ready: 0, unloading: 0, gone: 0 };
    for (const room of this.rooms.values()) byState[room.state]++;
    return { rooms: this.rooms.size, byState };
  }

  private whenLoaded(room: Room): void {
    // Everyone may have left while it loaded.
    room.ready.then(
      () => {
        if (room.peers.size === 0) this.unload(room);
      },
      () => {},
    );
  }

  private unload(room: Room): Promise<void> {
    return room.unload().then(() => {
      if (this.rooms.get(room.name) === room) this.rooms.delete(room.name);
    });
  }
}
