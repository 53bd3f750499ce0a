import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import { adoptRaw, rawAbsolutePath, removeRaw } from '../traces/trace-store';
import { checkBytes, RawFileChanged, RawFileMissing, type RawStorage } from './raw-storage';

async function readOrMissing(key: string, abs: string): Promise<Buffer> {
  try {
    return await fs.readFile(abs);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') throw new RawFileMissing(key);
    throw err;
  }
}

/** Raw traces in a folder on this machine (UPLOAD_DIR): the default, and right for one instance. */
export class FolderStorage implements RawStorage {
  readonly kind = 'folder' as const;
  readonly describe: string;

  constructor(private readonly dir: string) {
    this.describe = `folder ${dir}`;
  }

  adopt(inboxPath: string, when = new Date()) {
    return adoptRaw(this.dir, inboxPath, when);
  }

  async read(key: string, sha256: string) {
    return checkBytes(key, await readOrMissing(key, rawAbsolutePath(this.dir, key)), sha256);
  }

  async checkout(key: string, sha256: string) {
    const abs = rawAbsolutePath(this.dir, key);
    // Hashed as it is read: a stored file of up to the upload limit is never held whole for the check.
    const hash = createHash('sha256');
    try {
      for await (const chunk of createReadStream(abs)) hash.update(chunk as Buffer);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') throw new RawFileMissing(key);
      throw err;
    }
    if (hash.digest('hex') !== sha256) throw new RawFileChanged(key);
    return { path: abs, release: async () => undefined };
  }

  remove(key: string) {
    return removeRaw(this.dir, key);
  }

  async list() {
    const root = path.join(this.dir, 'traces');
    let entries;
    try {
      entries = await fs.readdir(root, { recursive: true, withFileTypes: true });
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') return [];
      throw err;
    }
    const out: Array<{ key: string; modifiedMs: number }> = [];
    for (const e of entries) {
      if (!e.isFile()) continue;
      const abs = path.join(e.parentPath, e.name);
      const stat = await fs.stat(abs).catch(() => null);
      if (stat) out.push({ key: path.relative(this.dir, abs).split(path.sep).join('/'), modifiedMs: stat.mtimeMs });
    }
    return out;
  }

  async ping() {
    await fs.access(this.dir, fs.constants.R_OK | fs.constants.W_OK);
  }
}
