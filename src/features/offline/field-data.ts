/**
 * The field data a technician needs without signal — sites, cable runs with
 * their route markers, and the cable library — read through the API as the
 * signed-in user (so the server decides what they may see) and kept on the
 * phone for that user only.
 */
import type { CableTypeView } from '../../../shared/schemas/cables';
import type { CableRunView, SiteSummary } from '../../../shared/schemas/sites';
import type { Page } from '../../../shared/schemas/users';
import { api } from '../../lib/api-client';
import type { FieldData } from './device-db';

/** Every page of a list. */
async function all<T>(path: string, pageSize: number, query: Record<string, string | number> = {}): Promise<T[]> {
  const items: T[] = [];
  for (let page = 1; ; page++) {
    const p = await api<Page<T>>(path, { query: { ...query, page, pageSize } });
    items.push(...p.items);
    if (p.items.length === 0 || items.length >= p.total) return items;
  }
}

export async function fetchFieldData(userId: number, now = new Date()): Promise<FieldData> {
  const [sites, runs, cables] = await Promise.all([
    all<SiteSummary>('/api/sites', 100),
    all<CableRunView>('/api/cable-runs', 200),
    all<CableTypeView>('/api/cables', 200, { sort: 'name', dir: 'asc' }),
  ]);
  return { userId, savedAt: now.toISOString(), sites, runs, cables };
}

/** Field data older than this is fetched again when the phone is online. */
export const FIELD_DATA_FRESH_MS = 10 * 60_000;
