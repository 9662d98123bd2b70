/**
 * Kit image writes in flight, bounded by the bytes they hold. An image goes to several kits (one
 * file per reader) from one buffer; while its writes run, the build goes on making the next images,
 * until the images still being written hold more than the budget. Then it waits for the oldest to
 * finish, a sliding window that keeps the disk busy without letting images pile up in memory.
 * The newest image is never waited for by itself, so a single image larger than the budget still
 * overlaps with the next one's making.
 */
import { writeFile } from 'node:fs/promises';

export class WriteQueue {
  private readonly groups = new Set<Promise<void>>();
  private bytes = 0;
  private failure: unknown = null;

  constructor(private readonly budget: number) {}

  /** Starts writing `data` to every path; resolves when the images in flight fit the budget again. */
  async add(data: Uint8Array, paths: string[]): Promise<void> {
    this.bytes += data.byteLength;
    const group: Promise<void> = Promise.all(paths.map((p) => writeFile(p, data))).then(
      () => undefined,
      (e: unknown) => {
        this.failure ??= e;
      },
    ).finally(() => {
      this.bytes -= data.byteLength;
      this.groups.delete(group);
    });
    this.groups.add(group);
    while (this.failure === null && this.bytes > this.budget && this.groups.size > 1) await Promise.race(this.groups);
    if (this.failure !== null) throw this.failure;
  }

  /** Waits for every write; throws the first failure. */
  async flush(): Promise<void> {
    await Promise.all(this.groups);
    if (this.failure !== null) throw this.failure;
  }

  /** Waits for every write, whatever happened (before removing a failed build's files). */
  async settle(): Promise<void> {
    await Promise.allSettled(this.groups);
  }
}
