import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Every decision on an event (confirmed or dismissed) and every reversal of
 * one, with who, when and why. Findings decided before this table existed get
 * their first decision written from the finding itself.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('finding_decisions', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    finding_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'findings', key: 'id' }, onDelete: 'CASCADE' },
    action: { type: DataTypes.STRING(12), allowNull: false },
    from_status: { type: DataTypes.STRING(12), allowNull: true },
    to_status: { type: DataTypes.STRING(12), allowNull: false },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: true },
    decided_by_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('finding_decisions', ['finding_id'], { name: 'finding_decisions_finding' });
  await qi.sequelize.query(
    `INSERT INTO finding_decisions (finding_id, action, from_status, to_status, kind, reason, decided_by_id, created_at)
     SELECT id, 'decided', NULL, status, kind, NULL, confirmed_by_id, confirmed_at FROM findings`,
  );
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('finding_decisions');
};
