import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One message as the local capture SMTP server received it, parsed. */
export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
  declare id: CreationOptional<number>;
  declare messageId: string | null;
  declare fromAddress: string;
  /** Comma-separated, as in the To header. */
  declare toAddresses: string;
  declare ccAddresses: string | null;
  /** The SMTP envelope recipients, comma-separated (includes Bcc). */
  declare envelopeTo: string;
  declare subject: string;
  declare text: string | null;
  declare html: string | null;
  /** JSON: [{ key, line }] in the order received. */
  declare headers: string;
  /** The message's Date header, or the time received when it has none. */
  declare sentAt: Date;
  declare receivedAt: Date;
}

export function initOutboxMessage(sequelize: Sequelize) {
  OutboxMessage.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      messageId: { type: DataTypes.STRING(300), allowNull: true },
      fromAddress: { type: DataTypes.STRING(500), allowNull: false },
      toAddresses: { type: DataTypes.TEXT, allowNull: false },
      ccAddresses: { type: DataTypes.TEXT, allowNull: true },
      envelopeTo: { type: DataTypes.TEXT, allowNull: false },
      subject: { type: DataTypes.STRING(500), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: true },
      html: { type: DataTypes.TEXT, allowNull: true },
      headers: { type: DataTypes.TEXT, allowNull: false },
      sentAt: { type: DataTypes.DATE, allowNull: false },
      receivedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'outbox_messages', modelName: 'OutboxMessage', underscored: true, timestamps: false },
  );
}
