import { randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';

/**
 * Raw trace files, kept byte for byte as uploaded. An upload is streamed into
 * the inbox (`incoming/`), then moved into `traces/YYYY/MM/` under a
 * generated name (the uploader's file name is only recorded) and made
 * read-only; it is never opened for writing again.
 */
export function rawAbsolutePath(uploadDir: string, rel: string): string {
  const abs = path.resolve(uploadDir, rel);
  if (!abs.startsWith(path.resolve(uploadDir) + path.sep)) throw new Error(`stored path escapes the upload directory: ${rel}`);
  return abs;
}

export async function removeRaw(uploadDir: string, rel: string) {
  await fs.rm(rawAbsolutePath(uploadDir, rel), { force: true });
}

/** Where multipart uploads are streamed while they arrive, before they are analysed and stored. */
export function inboxDir(uploadDir: string): string {
  return path.join(uploadDir, 'incoming');
}

/** A new place in the store for a file received today. */
function newRawPath(when: Date): string {
  return path.posix.join('traces', String(when.getUTCFullYear()), String(when.getUTCMonth() + 1).padStart(2, '0'), `${randomUUID()}.csv`);
}

/**
 * Inbox files a request of this process is still writing or working on (an upload waiting its turn in the analysis
 * pool can sit there longer than the sweep's minimum age): the sweep while running leaves them alone whatever their age.
 */
const heldInbox = new Set<string>();

/** Marks inbox files as in use by this process until `releaseInbox`. */
export function holdInbox(...files: string[]) {
  for (const f of files) heldInbox.add(path.resolve(f));
}

export function releaseInbox(...files: string[]) {
  for (const f of files) heldInbox.delete(path.resolve(f));
}

/**
 * The sweep while running: inbox files at least `minAgeMs` old that no request of this process holds, which an upload
 * cut off by a killed process (or a crash of this one's predecessor) left. Stored files are left to the start-up
 * sweep: a file moved into the store a moment before its row commits is not an orphan.
 */
export function sweepInbox(uploadDir: string, minAgeMs: number, now = Date.now()): Promise<string[]> {
  return sweepOrphans(uploadDir, heldInbox, minAgeMs, now, [inboxDir(uploadDir)]);
}

/** Put bytes given in memory (the demo seed) into the inbox, as an upload would arrive. */
export async function writeInbox(uploadDir: string, bytes: Buffer): Promise<string> {
  const abs = path.join(inboxDir(uploadDir), `${randomUUID()}.part`);
  await fs.mkdir(path.dirname(abs), { recursive: true });
  holdInbox(abs);
  await fs.writeFile(abs, bytes, { flag: 'wx', mode: 0o600 });
  return abs;
}

/** Move a received file from the inbox into the store (same file system: a rename), read-only from then on. */
export async function adoptRaw(uploadDir: string, inboxPath: string, when = new Date()): Promise<string> {
  const rel = newRawPath(when);
  const abs = rawAbsolutePath(uploadDir, rel);
  await fs.mkdir(path.dirname(abs), { recursive: true });
  await fs.chmod(inboxPath, 0o440);
  await fs.rename(inboxPath, abs);
  return rel;
}

async function filesUnder(dir: string): Promise<string[]> {
  try {
    const entries = await fs.readdir(dir, { recursive: true, withFileTypes: true });
    return entries.filter((e) => e.isFile()).map((e) => path.join(e.parentPath, e.name));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return [];
    throw err;
  }
}

/**
 * Files in the store that no trace row names, and uploads left in the inbox:
 * what a crash between writing a file and committing its row leaves behind.
 * Files younger than `minAgeMs` are left alone (an upload may be arriving).
 */
export async function sweepOrphans(
  uploadDir: string,
  storedPaths: Iterable<string>,
  minAgeMs: number,
  now = Date.now(),
  folders = [path.join(uploadDir, 'traces'), inboxDir(uploadDir)],
): Promise<string[]> {
  const known = new Set<string>();
  for (const rel of storedPaths) known.add(path.resolve(uploadDir, rel));
  const candidates = (await Promise.all(folders.map(filesUnder))).flat();
  const removed: string[] = [];
  for (const abs of candidates) {
    if (known.has(abs)) continue;
    const stat = await fs.stat(abs).catch(() => null);
    if (!stat || now - stat.mtimeMs < minAgeMs) continue;
    await fs.rm(abs, { force: true });
    removed.push(path.relative(uploadDir, abs));
  }
  return removed;
}
