import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Role } from '../../../shared/auth/permissions';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare role: Role;
  declare passwordHash: string;
  declare active: CreationOptional<boolean>;
  declare mustChangePassword: CreationOptional<boolean>;
  declare unitPreference: CreationOptional<'m' | 'ft'>;
  declare phone: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  toPublic() {
    return {
      id: this.id,
      email: this.email,
      name: this.name,
      role: this.role,
      active: this.active,
      mustChangePassword: this.mustChangePassword,
      unitPreference: this.unitPreference,
    };
  }
}

export function initUser(sequelize: Sequelize) {
  User.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      role: { type: DataTypes.STRING(20), allowNull: false },
      passwordHash: { type: DataTypes.STRING(300), allowNull: false, field: 'password_hash' },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      mustChangePassword: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false, field: 'must_change_password' },
      unitPreference: { type: DataTypes.STRING(2), allowNull: false, defaultValue: 'm', field: 'unit_preference' },
      phone: { type: DataTypes.STRING(40), allowNull: true },
      createdAt: { type: DataTypes.DATE, field: 'created_at' },
      updatedAt: { type: DataTypes.DATE, field: 'updated_at' },
    },
    { sequelize, tableName: 'users', modelName: 'User' },
  );
}
