import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** 'sending': claimed by an instance that is handing it to the relay; its lease ends at nextAttemptAt. */
export const MAIL_JOB_STATUSES = ['queued', 'sending', 'sent', 'failed'] as const;
export type MailJobStatus = (typeof MAIL_JOB_STATUSES)[number];

/**
 * One e-mail waiting to go out. It is written in the same transaction as the
 * change it reports and sent after commit, so a relay that is down delays the
 * mail but never undoes the change.
 */
export class MailJob extends Model<InferAttributes<MailJob>, InferCreationAttributes<MailJob>> {
  declare id: CreationOptional<number>;
  /** What the message is about, for lists: 'finding-confirmed', 'ticket-assigned', … */
  declare kind: string;
  /** Comma-separated addresses. */
  declare toAddresses: string;
  declare subject: string;
  declare text: string;
  declare html: string | null;
  declare status: CreationOptional<MailJobStatus>;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare lastAttemptAt: CreationOptional<Date | null>;
  declare lastError: CreationOptional<string | null>;
  declare sentAt: CreationOptional<Date | null>;
  declare messageId: CreationOptional<string | null>;
  declare ticketId: number | null;
  declare findingId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initMailJob(sequelize: Sequelize) {
  MailJob.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      kind: { type: DataTypes.STRING(40), allowNull: false },
      toAddresses: { type: DataTypes.TEXT, allowNull: false },
      subject: { type: DataTypes.STRING(500), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      html: { type: DataTypes.TEXT, allowNull: true },
      status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'queued' },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: DataTypes.DATE, allowNull: false },
      lastAttemptAt: { type: DataTypes.DATE, allowNull: true },
      lastError: { type: DataTypes.TEXT, allowNull: true },
      sentAt: { type: DataTypes.DATE, allowNull: true },
      messageId: { type: DataTypes.STRING(300), allowNull: true },
      ticketId: { type: DataTypes.INTEGER, allowNull: true },
      findingId: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'mail_jobs', modelName: 'MailJob', underscored: true },
  );
}
