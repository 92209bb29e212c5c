/**
 * Back-pressure: the connections stop reading while the samples held
 * uncommitted (waiting for a batch or in one being written) reach the
 * buffer's limit, and read again once a batch has gone and there is room.
 */

/** Decides whether there is room and wakes the readers waiting for it. */
export class RoomGate {
  private waiters: Array<() => void> = [];
  private opened = false;

  /** `held()`: the samples held now; there is room while it is below `limit`. */
  constructor(
    private readonly limit: number,
    private readonly held: () => number,
  ) {}

  /** True while the buffer has room for more. */
  hasRoom(): boolean {
    return this.held() < this.limit;
  }

  /** Resolves at once while there is room (or once opened for good), else at the first {@link release} that finds room. */
  room(): Promise<void> {
    if (this.hasRoom() || this.opened) return Promise.resolve();
    return new Promise((resolve) => this.waiters.push(resolve));
  }

  /** Wakes every reader waiting, if there is room now. */
  release(): void {
    if (!this.hasRoom() || this.waiters.length === 0) return;
    this.wakeAll();
  }

  /** Wakes every reader, room or not, and lets every later one through (stopping: nothing will make room). */
  openForGood(): void {
    this.opened = true;
    this.wakeAll();
  }

  private wakeAll(): void {
    const waiters = this.waiters;
    this.waiters = [];
    for (const w of waiters) w();
  }
}
