import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * The outgoing-mail queue and the local capture server's store.
 * ticket_id and finding_id carry no foreign key: tickets come in a later
 * migration, findings in the field workflow's, and a mail record outlives both.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('mail_jobs', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    to_addresses: { type: DataTypes.TEXT, allowNull: false },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    html: { type: DataTypes.TEXT, allowNull: true },
    status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'queued' },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    next_attempt_at: { type: DataTypes.DATE, allowNull: false },
    last_attempt_at: { type: DataTypes.DATE, allowNull: true },
    last_error: { type: DataTypes.TEXT, allowNull: true },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    message_id: { type: DataTypes.STRING(300), allowNull: true },
    ticket_id: { type: DataTypes.INTEGER, allowNull: true },
    finding_id: { type: DataTypes.INTEGER, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('mail_jobs', ['status', 'next_attempt_at'], { name: 'mail_jobs_status_next' });
  await qi.addIndex('mail_jobs', ['ticket_id'], { name: 'mail_jobs_ticket' });

  await qi.createTable('outbox_messages', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    message_id: { type: DataTypes.STRING(300), allowNull: true },
    from_address: { type: DataTypes.STRING(500), allowNull: false },
    to_addresses: { type: DataTypes.TEXT, allowNull: false },
    cc_addresses: { type: DataTypes.TEXT, allowNull: true },
    envelope_to: { type: DataTypes.TEXT, allowNull: false },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: true },
    html: { type: DataTypes.TEXT, allowNull: true },
    headers: { type: DataTypes.TEXT, allowNull: false },
    sent_at: { type: DataTypes.DATE, allowNull: false },
    received_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('outbox_messages', ['received_at'], { name: 'outbox_messages_received' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('outbox_messages');
  await qi.dropTable('mail_jobs');
};
