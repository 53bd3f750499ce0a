import { useQueryClient } from '@tanstack/react-query';
import {
  createContext,
  useCallback,
  useContext,
  useEffect,
  useMemo,
  useRef,
  useState,
  useSyncExternalStore,
  type ReactNode,
} from 'react';
import { can } from '../../../shared/auth/permissions';
import type { PublicUser } from '../../../shared/schemas/users';
import { describeError } from '../../lib/api-client';
import { getMeQueryOptions } from '../auth/api/get-me';
import { getTicketQueryOptions } from '../tickets/api/get-ticket';
import {
  deviceDb,
  fieldDataFor,
  keepFieldDataOf,
  lastSync,
  outboxStore,
  recordSync,
  rememberUser,
  saveFieldData,
  type FieldData,
  type SyncRecord,
} from './device-db';
import { FIELD_DATA_FRESH_MS, fetchFieldData } from './field-data';
import { isDue, isUnsent, resumeAfterSignIn, retry as retryItem, type OutboxItem } from './outbox-machine';
import { recoverOutbox, syncOutbox } from './outbox-sync';
import { browserTransport } from './outbox-transport';

/** Whether the browser has a network at all (it cannot know whether the server answers: a sync tells that). */
function subscribeOnline(onChange: () => void) {
  window.addEventListener('online', onChange);
  window.addEventListener('offline', onChange);
  return () => {
    window.removeEventListener('online', onChange);
    window.removeEventListener('offline', onChange);
  };
}
export function useOnline(): boolean {
  return useSyncExternalStore(
    subscribeOnline,
    () => navigator.onLine,
    () => true,
  );
}

export interface DeviceState {
  online: boolean;
  user: PublicUser;
  /** Whether this account uses the phone's field data and outbox (it may upload traces). */
  fieldUser: boolean;
  field: FieldData | null;
  fieldRefreshing: boolean;
  fieldError: string | null;
  refreshField: () => Promise<void>;
  /** This account's items, oldest first, sent ones included. */
  mine: OutboxItem[];
  /** This account's items not yet on the server. */
  waiting: OutboxItem[];
  /** Other accounts' unsent items kept on this phone. */
  others: OutboxItem[];
  syncing: boolean;
  last: SyncRecord | null;
  sync: (manual?: boolean) => Promise<void>;
  /** Check the sign-in again: an ended one sends the person to the sign-in page, and back here after. */
  askSignIn: () => void;
  retry: (id: string) => Promise<void>;
  remove: (id: string) => Promise<void>;
  enqueue: (items: OutboxItem[]) => Promise<void>;
}

const DeviceContext = createContext<DeviceState | null>(null);

export function useDevice(): DeviceState {
  const d = useContext(DeviceContext);
  if (!d) throw new Error('useDevice() used outside <DeviceProvider>');
  return d;
}

/** Two tabs of the app never send the same outbox at once (the idempotency key would catch it; this saves the traffic). */
async function exclusively<T>(fn: () => Promise<T>): Promise<T> {
  if (typeof navigator !== 'undefined' && navigator.locks) return navigator.locks.request('rholog-outbox', fn);
  return fn();
}

/** How often the outbox looks for items due again by themselves. */
const TICK_MS = 15_000;

/**
 * The phone's side of Rholog for the signed-in user: the field data kept for
 * them, and the outbox sent whenever there is a network.
 */
export function DeviceProvider({ user, children }: { user: PublicUser; children: ReactNode }) {
  const online = useOnline();
  const fieldUser = can(user.role, 'traces:upload');
  const [field, setField] = useState<FieldData | null>(null);
  const [fieldRefreshing, setFieldRefreshing] = useState(false);
  const [fieldError, setFieldError] = useState<string | null>(null);
  const [items, setItems] = useState<OutboxItem[]>([]);
  const [last, setLast] = useState<SyncRecord | null>(null);
  const [syncing, setSyncing] = useState(false);
  const running = useRef<Promise<void> | null>(null);
  const qc = useQueryClient();
  const askSignIn = useCallback(() => void qc.invalidateQueries({ queryKey: getMeQueryOptions().queryKey }), [qc]);

  const reload = useCallback(async () => {
    const db = await deviceDb();
    setItems(await outboxStore(db).list());
    setLast(await lastSync(db, user.id));
  }, [user.id]);

  const sync = useCallback(
    async (manual = false) => {
      if (!fieldUser) return;
      if (running.current) return running.current;
      const pass = (async () => {
        setSyncing(true);
        try {
          const db = await deviceDb();
          const store = outboxStore(db);
          const waiting = (await store.list()).filter((i) => i.userId === user.id && isUnsent(i));
          if (!waiting.length) return;
          if (!manual && !waiting.some((i) => isDue(i, new Date()))) return;
          const report = await exclusively(() => syncOutbox(store, browserTransport, user.id, { manual }));
          await recordSync(db, { userId: user.id, at: new Date().toISOString(), sent: report.sent, problem: report.problem });
          // The server no longer knows this sign-in: ask for it now rather than let the outbox wait unseen.
          if (report.problem?.status === 401) askSignIn();
        } finally {
          setSyncing(false);
          running.current = null;
          await reload();
        }
      })();
      running.current = pass;
      return pass;
    },
    [fieldUser, user.id, reload, askSignIn],
  );

  const refreshField = useCallback(async () => {
    if (!fieldUser) return;
    setFieldRefreshing(true);
    try {
      // Each ticket through the ticket page's own query: one request when the page is loading that ticket too.
      const data = await fetchFieldData(user.id, can(user.role, 'tickets:work'), new Date(), (id) => qc.fetchQuery(getTicketQueryOptions(id)));
      const db = await deviceDb();
      await saveFieldData(db, data);
      setField(data);
      setFieldError(null);
    } catch (err) {
      setFieldError(describeError(err));
    } finally {
      setFieldRefreshing(false);
    }
  }, [fieldUser, user.id, user.role, qc]);

  // On sign-in or start: remember who this is, keep only their field data, pick up what a closed app left half-sent.
  useEffect(() => {
    let live = true;
    (async () => {
      const db = await deviceDb();
      await rememberUser(db, user);
      await keepFieldDataOf(db, user.id);
      const store = outboxStore(db);
      await recoverOutbox(store);
      for (const item of await store.list()) {
        const next = resumeAfterSignIn(item, user.id);
        if (next !== item) await store.put(next);
      }
      if (!live) return;
      setField(await fieldDataFor(db, user.id));
      await reload();
    })();
    return () => {
      live = false;
    };
  }, [user, reload]);

  // Online: refresh stale field data and send what waits; again each time the network comes back.
  useEffect(() => {
    if (!online || !fieldUser) return;
    void sync();
    void (async () => {
      const kept = await fieldDataFor(await deviceDb(), user.id);
      if (!kept || Date.now() - new Date(kept.savedAt).getTime() > FIELD_DATA_FRESH_MS) await refreshField();
    })();
    const timer = window.setInterval(() => void sync(), TICK_MS);
    return () => window.clearInterval(timer);
  }, [online, fieldUser, user.id, sync, refreshField]);

  const value = useMemo<DeviceState>(() => {
    const mine = items.filter((i) => i.userId === user.id);
    return {
      online,
      user,
      fieldUser,
      field,
      fieldRefreshing,
      fieldError,
      refreshField,
      mine,
      waiting: mine.filter(isUnsent),
      others: items.filter((i) => i.userId !== user.id && isUnsent(i)),
      syncing,
      last,
      sync,
      askSignIn,
      retry: async (id) => {
        const store = outboxStore(await deviceDb());
        const item = await store.get(id);
        if (item && item.userId === user.id) await store.put(retryItem(item));
        await reload();
        if (navigator.onLine) await sync(true);
      },
      remove: async (id) => {
        await outboxStore(await deviceDb()).remove(id);
        await reload();
      },
      enqueue: async (list) => {
        const store = outboxStore(await deviceDb());
        for (const item of list) await store.put(item);
        await reload();
        if (navigator.onLine) void sync(true);
      },
    };
  }, [items, user, online, fieldUser, field, fieldRefreshing, fieldError, refreshField, syncing, last, sync, askSignIn, reload]);

  return <DeviceContext.Provider value={value}>{children}</DeviceContext.Provider>;
}
