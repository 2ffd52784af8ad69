// The local store: a folder on this machine (by default <repo>/uploads, MODESHELF_UPLOADS_DIR moves it),
// each key a file under it: sha256/ab/abcd… as the upload folder has always been laid out. Every write
// goes to a temporary file in <root>/tmp first and is renamed into place (same filesystem, so atomic):
// a reader never sees half a file, and a failed write leaves no object behind.
import { randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { copyFile, mkdir, open, rename, rm, stat } from 'node:fs/promises';
import path from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { buffer } from 'node:stream/consumers';
import { checkKey, StorageError, StorageKeyNotFound, type ObjectStore } from './types';

function isMissing(e: unknown): boolean {
  const code = (e as NodeJS.ErrnoException)?.code;
  return code === 'ENOENT' || code === 'ENOTDIR';
}

export class LocalStore implements ObjectStore {
  readonly kind = 'local' as const;
  readonly location: string;

  constructor(readonly root: string) {
    this.root = path.resolve(root);
    this.location = `the folder ${this.root}`;
  }

  /** Absolute path of a key; refuses keys that would leave the folder. */
  pathOf(key: string): string {
    const full = path.resolve(this.root, checkKey(key));
    if (!full.startsWith(this.root + path.sep)) throw new StorageError(`storage key outside ${this.location}: ${key}`);
    return full;
  }

  localPath(key: string): string {
    return this.pathOf(key);
  }

  private async tempPath(): Promise<string> {
    const dir = path.join(this.root, 'tmp');
    await mkdir(dir, { recursive: true });
    return path.join(dir, `${Date.now()}-${randomBytes(8).toString('hex')}.store`);
  }

  private async place(temp: string, target: string): Promise<void> {
    try {
      await mkdir(path.dirname(target), { recursive: true });
      await rename(temp, target);
    } catch (e) {
      await rm(temp, { force: true });
      throw new StorageError(`could not write ${target}: ${(e as Error).message}`, e);
    }
  }

  async put(key: string, body: Buffer | string | Readable): Promise<void> {
    const target = this.pathOf(key);
    const temp = await this.tempPath();
    try {
      const source = typeof body === 'string' || Buffer.isBuffer(body) ? Readable.from([Buffer.from(body)]) : body;
      await pipeline(source, createWriteStream(temp, { flags: 'wx' }));
    } catch (e) {
      await rm(temp, { force: true });
      throw e instanceof StorageError ? e : new StorageError(`could not write "${key}" to ${this.location}: ${(e as Error).message}`, e);
    }
    await this.place(temp, target);
  }

  async putFile(key: string, filePath: string, options: { move?: boolean } = {}): Promise<void> {
    const target = this.pathOf(key);
    if (options.move) {
      try {
        await mkdir(path.dirname(target), { recursive: true });
        await rename(filePath, target);
        return;
      } catch (e) {
        // Another filesystem: copy below, then remove the original.
        if ((e as NodeJS.ErrnoException).code !== 'EXDEV') {
          throw new StorageError(`could not move ${filePath} into ${this.location}: ${(e as Error).message}`, e);
        }
      }
    }
    const temp = await this.tempPath();
    try {
      await copyFile(filePath, temp);
    } catch (e) {
      await rm(temp, { force: true });
      throw new StorageError(`could not copy ${filePath} into ${this.location}: ${(e as Error).message}`, e);
    }
    await this.place(temp, target);
    if (options.move) await rm(filePath, { force: true });
  }

  async get(key: string): Promise<Buffer> {
    return buffer(await this.getStream(key));
  }

  async getStream(key: string): Promise<Readable> {
    const file = this.pathOf(key);
    // Opening first turns a missing file into StorageKeyNotFound here, not into a stream error later.
    let handle;
    try {
      handle = await open(file, 'r');
    } catch (e) {
      if (isMissing(e)) throw new StorageKeyNotFound(key, this.location);
      throw new StorageError(`could not read "${key}" from ${this.location}: ${(e as Error).message}`, e);
    }
    return handle.createReadStream({ autoClose: true });
  }

  async exists(key: string): Promise<boolean> {
    try {
      return (await stat(this.pathOf(key))).isFile();
    } catch (e) {
      if (isMissing(e)) return false;
      throw new StorageError(`could not look up "${key}" in ${this.location}: ${(e as Error).message}`, e);
    }
  }

  async size(key: string): Promise<number> {
    try {
      return (await stat(this.pathOf(key))).size;
    } catch (e) {
      if (isMissing(e)) throw new StorageKeyNotFound(key, this.location);
      throw new StorageError(`could not look up "${key}" in ${this.location}: ${(e as Error).message}`, e);
    }
  }

  async delete(key: string): Promise<void> {
    await rm(this.pathOf(key), { force: true });
  }
}
