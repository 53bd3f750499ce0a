import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { CableType } from './cable-type';
import type { User } from './user';

export const CHANGE_KINDS = ['create', 'update', 'import', 'calibration'] as const;
export type ChangeKind = (typeof CHANGE_KINDS)[number];

/** One field's change inside a history entry; values as stored (SI), null when absent. */
export interface FieldChange {
  field: string;
  from: string | number | null;
  to: string | number | null;
}

/**
 * The cable library's history: one row per create / update / import / accepted
 * calibration, with who, when, why and every field's old → new value.
 * `revision` is the cable type's revision after this change (see CableType.revision).
 */
export class CableTypeChange extends Model<InferAttributes<CableTypeChange>, InferCreationAttributes<CableTypeChange>> {
  declare id: CreationOptional<number>;
  declare cableTypeId: number;
  declare revision: number;
  declare kind: ChangeKind;
  declare changedById: number | null;
  declare reason: string;
  declare changes: FieldChange[];
  declare calibrationId: number | null;
  declare createdAt: CreationOptional<Date>;

  declare changedBy?: NonAttribute<User>;
}

export function initCableTypeChange(sequelize: Sequelize) {
  CableTypeChange.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      cableTypeId: { type: DataTypes.INTEGER, allowNull: false },
      revision: { type: DataTypes.INTEGER, allowNull: false },
      kind: { type: DataTypes.STRING(20), allowNull: false },
      changedById: { type: DataTypes.INTEGER, allowNull: true },
      reason: { type: DataTypes.TEXT, allowNull: false },
      // Stored as JSON text so SQLite and PostgreSQL behave the same.
      changes: {
        type: DataTypes.TEXT,
        allowNull: false,
        get(this: CableTypeChange) {
          const raw = this.getDataValue('changes') as unknown as string;
          return raw ? (JSON.parse(raw) as FieldChange[]) : [];
        },
        set(this: CableTypeChange, value: FieldChange[]) {
          this.setDataValue('changes', JSON.stringify(value) as unknown as FieldChange[]);
        },
      },
      calibrationId: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'cable_type_changes', modelName: 'CableTypeChange', underscored: true, updatedAt: false },
  );
}

export function associateCableTypeChange(models: { CableType: typeof CableType; User: typeof User }) {
  // createApp may run more than once in a process (tests); an alias can be declared only once.
  if (CableTypeChange.associations.cableType) return;
  CableTypeChange.belongsTo(models.CableType, { as: 'cableType', foreignKey: 'cableTypeId' });
  CableTypeChange.belongsTo(models.User, { as: 'changedBy', foreignKey: 'changedById' });
}
