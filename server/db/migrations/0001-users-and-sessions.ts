import { DataTypes } from 'sequelize';
import type { Migration } from './index';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('users', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    role: { type: DataTypes.STRING(20), allowNull: false },
    password_hash: { type: DataTypes.STRING(300), allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    must_change_password: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    unit_preference: { type: DataTypes.STRING(2), allowNull: false, defaultValue: 'm' },
    phone: { type: DataTypes.STRING(40), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.createTable('sessions', {
    sid: { type: DataTypes.STRING(64), primaryKey: true },
    expires: { type: DataTypes.DATE, allowNull: true },
    data: { type: DataTypes.TEXT, allowNull: false },
    user_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('sessions', ['user_id']);
  await qi.addIndex('sessions', ['expires']);
  await qi.createTable('app_settings', {
    key: { type: DataTypes.STRING(100), primaryKey: true },
    value: { type: DataTypes.TEXT, allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('app_settings');
  await qi.dropTable('sessions');
  await qi.dropTable('users');
};
