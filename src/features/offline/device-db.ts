/**
 * Rholog's store on the phone (IndexedDB through idb): the signed-in user,
 * the field data they may read (sites, cable runs with route markers, the
 * cable library), the outbox, and the last sync. Everything here is about
 * one device; the server stays the record.
 */
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { CableTypeView } from '../../../shared/schemas/cables';
import type { CableRunView, SiteSummary } from '../../../shared/schemas/sites';
import type { TicketDetail } from '../../../shared/schemas/tickets';
import type { PublicUser } from '../../../shared/schemas/users';
import type { OutboxItem, Problem } from './outbox-machine';

export const DEVICE_DB_NAME = 'rholog-device';
const VERSION = 1;

/** The field data one user may read, as the server gave it to them. */
export interface FieldData {
  userId: number;
  savedAt: string;
  sites: SiteSummary[];
  runs: CableRunView[];
  cables: CableTypeView[];
  /**
   * The open repair tickets assigned to this user, each whole (where to dig, access, notes), so a ticket opened
   * again without signal still says where to dig. Absent from field data saved before it was kept.
   */
  tickets?: TicketDetail[];
}

export interface SyncRecord {
  userId: number;
  at: string;
  /** Items the server took in this sync. */
  sent: number;
  /** Why the sync stopped short, when it did. */
  problem: Problem | null;
}

export interface DeviceUser {
  user: PublicUser;
  savedAt: string;
}

interface DeviceSchema extends DBSchema {
  user: { key: 'current'; value: DeviceUser };
  field: { key: number; value: FieldData };
  outbox: { key: string; value: OutboxItem; indexes: { byCreated: string } };
  sync: { key: number; value: SyncRecord };
}

export type DeviceDb = IDBPDatabase<DeviceSchema>;

export function openDeviceDb(name = DEVICE_DB_NAME): Promise<DeviceDb> {
  return openDB<DeviceSchema>(name, VERSION, {
    upgrade(db) {
      db.createObjectStore('user');
      db.createObjectStore('field', { keyPath: 'userId' });
      const outbox = db.createObjectStore('outbox', { keyPath: 'id' });
      outbox.createIndex('byCreated', 'createdAt');
      db.createObjectStore('sync', { keyPath: 'userId' });
    },
  });
}

let shared: Promise<DeviceDb> | null = null;
/** The app's one connection. */
export function deviceDb(): Promise<DeviceDb> {
  shared ??= openDeviceDb();
  return shared;
}

export const outboxStore = (db: DeviceDb) => ({
  /** Oldest first: the order they were made in is the order they are sent in. */
  list: () => db.getAllFromIndex('outbox', 'byCreated'),
  get: (id: string) => db.get('outbox', id),
  put: async (item: OutboxItem) => {
    await db.put('outbox', item);
  },
  remove: (id: string) => db.delete('outbox', id),
});
export type OutboxStore = ReturnType<typeof outboxStore>;

export async function rememberUser(db: DeviceDb, user: PublicUser, now = new Date()) {
  await db.put('user', { user, savedAt: now.toISOString() }, 'current');
}

export async function rememberedUser(db: DeviceDb): Promise<DeviceUser | null> {
  return (await db.get('user', 'current')) ?? null;
}

/** Field data for this user only: another account's copy is never handed out. */
export async function fieldDataFor(db: DeviceDb, userId: number): Promise<FieldData | null> {
  return (await db.get('field', userId)) ?? null;
}

/**
 * Keep one user's field data; any other account's copy goes, so the phone
 * never holds more than the signed-in person may read.
 */
export async function saveFieldData(db: DeviceDb, data: FieldData) {
  const tx = db.transaction('field', 'readwrite');
  for (const key of await tx.store.getAllKeys()) if (key !== data.userId) await tx.store.delete(key);
  await tx.store.put(data);
  await tx.done;
}

export async function lastSync(db: DeviceDb, userId: number): Promise<SyncRecord | null> {
  return (await db.get('sync', userId)) ?? null;
}

export async function recordSync(db: DeviceDb, record: SyncRecord) {
  await db.put('sync', record);
}

/**
 * Signing out: the field data, the remembered user and the sync record go.
 * Unsent items go too when `dropUnsent`; otherwise they stay, still locked
 * to their owner, for that person's next sign-in (or an administrator).
 */
export async function forgetUser(db: DeviceDb, userId: number, opts: { dropUnsent: boolean }) {
  const tx = db.transaction(['user', 'field', 'sync', 'outbox'], 'readwrite');
  await tx.objectStore('user').delete('current');
  await tx.objectStore('field').clear();
  await tx.objectStore('sync').delete(userId);
  const outbox = tx.objectStore('outbox');
  for (const item of await outbox.getAll()) {
    if (item.userId !== userId) continue;
    if (opts.dropUnsent || item.state === 'sent') await outbox.delete(item.id);
  }
  await tx.done;
}

/** Only the signed-in account's field data stays on the phone. */
export async function keepFieldDataOf(db: DeviceDb, userId: number) {
  const tx = db.transaction('field', 'readwrite');
  for (const key of await tx.store.getAllKeys()) if (key !== userId) await tx.store.delete(key);
  await tx.done;
}
