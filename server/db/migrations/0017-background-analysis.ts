import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Large uploads are analysed by a background job: a trace row may now say
 * 'pending' in `status` (next to 'ok', analysed, and 'failed'; rows written
 * before this migration were all analysed at upload and keep their status).
 * The job claims a pending trace with a lease (`analysis_lease_until`) and
 * counts its tries (`analysis_attempts`), so a try lost with its instance is
 * taken over after the lease and a file that keeps failing ends 'failed'.
 * Mail: a job being handed to the relay is 'sending' until its lease
 * (`next_attempt_at`) ends, and keeps one Message-ID for all its tries; the
 * capture server looks a repeat up by Message-ID (`outbox_messages_message_id`).
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('traces', 'analysis_attempts', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.addColumn('traces', 'analysis_lease_until', { type: DataTypes.DATE, allowNull: true });
  await qi.addIndex('outbox_messages', ['message_id'], { name: 'outbox_messages_message_id' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeIndex('outbox_messages', 'outbox_messages_message_id');
  await qi.removeColumn('traces', 'analysis_lease_until');
  await qi.removeColumn('traces', 'analysis_attempts');
};
