import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { TicketPriority, TicketStatus } from '../../../shared/tickets/status';
import type { CableRun } from './cable-run';
import type { Finding } from './finding';
import type { Site } from './site';
import type { User } from './user';

/** A repair job raised from one or more findings on one cable run. */
export class Ticket extends Model<InferAttributes<Ticket>, InferCreationAttributes<Ticket>> {
  declare id: CreationOptional<number>;
  declare title: string;
  declare siteId: number;
  declare cableRunId: number;
  declare status: TicketStatus;
  declare priority: TicketPriority;
  declare assigneeId: number | null;
  /** YYYY-MM-DD. */
  declare dueDate: string | null;
  declare notes: string | null;
  declare createdById: number;
  /** When it was signed off or withdrawn. */
  declare closedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare site?: NonAttribute<Site>;
  declare cableRun?: NonAttribute<CableRun>;
  declare assignee?: NonAttribute<User | null>;
  declare createdBy?: NonAttribute<User>;
  declare findings?: NonAttribute<Finding[]>;
}

export function initTicket(sequelize: Sequelize) {
  Ticket.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      title: { type: DataTypes.STRING(160), allowNull: false },
      siteId: { type: DataTypes.INTEGER, allowNull: false },
      cableRunId: { type: DataTypes.INTEGER, allowNull: false },
      status: { type: DataTypes.STRING(12), allowNull: false },
      priority: { type: DataTypes.STRING(10), allowNull: false },
      assigneeId: { type: DataTypes.INTEGER, allowNull: true },
      dueDate: { type: DataTypes.DATEONLY, allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      createdById: { type: DataTypes.INTEGER, allowNull: false },
      closedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'tickets', modelName: 'Ticket', underscored: true },
  );
}

export class TicketFinding extends Model<InferAttributes<TicketFinding>, InferCreationAttributes<TicketFinding>> {
  declare ticketId: number;
  declare findingId: number;
  declare createdAt: CreationOptional<Date>;
}

export function initTicketFinding(sequelize: Sequelize) {
  TicketFinding.init(
    {
      ticketId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      findingId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'ticket_findings', modelName: 'TicketFinding', underscored: true, updatedAt: false },
  );
}

export const TICKET_EVENT_KINDS = ['created', 'assigned', 'status', 'updated', 'comment', 'closeout'] as const;
export type TicketEventKind = (typeof TICKET_EVENT_KINDS)[number];

/** One line of a ticket's timeline: who, when, from → to, and what they said. */
export class TicketEvent extends Model<InferAttributes<TicketEvent>, InferCreationAttributes<TicketEvent>> {
  declare id: CreationOptional<number>;
  declare ticketId: number;
  declare actorId: number;
  declare kind: TicketEventKind;
  declare fromStatus: TicketStatus | null;
  declare toStatus: TicketStatus | null;
  declare comment: string | null;
  /** JSON { field: [before, after] }. */
  declare changes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare actor?: NonAttribute<User>;
}

export function initTicketEvent(sequelize: Sequelize) {
  TicketEvent.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      ticketId: { type: DataTypes.INTEGER, allowNull: false },
      actorId: { type: DataTypes.INTEGER, allowNull: false },
      kind: { type: DataTypes.STRING(12), allowNull: false },
      fromStatus: { type: DataTypes.STRING(12), allowNull: true },
      toStatus: { type: DataTypes.STRING(12), allowNull: true },
      comment: { type: DataTypes.TEXT, allowNull: true },
      changes: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'ticket_events', modelName: 'TicketEvent', underscored: true, updatedAt: false },
  );
}

/** Where the crew found the fault, compared with where it was located. */
export class TicketCloseout extends Model<InferAttributes<TicketCloseout>, InferCreationAttributes<TicketCloseout>> {
  declare id: CreationOptional<number>;
  declare ticketId: number;
  declare findingId: number;
  declare method: 'distance' | 'marker';
  declare markerId: number | null;
  declare markerLabel: string | null;
  declare offsetM: number | null;
  declare fromEnd: 'A' | 'B' | null;
  declare enteredDistanceM: number | null;
  /** The end the located reading was taken from; found and located distances are from it. */
  declare measuredFrom: 'A' | 'B';
  declare foundDistanceM: number;
  declare foundFromAM: number;
  declare foundChainageM: number;
  declare locatedDistanceM: number;
  declare errorM: number;
  declare roundTripNs: number;
  declare traceVf: number;
  declare impliedVf: number | null;
  declare cableTypeId: number;
  declare cause: string;
  declare workDone: string;
  declare calibrationId: number | null;
  declare recordedById: number;
  declare createdAt: CreationOptional<Date>;
  declare recordedBy?: NonAttribute<User>;
}

export function initTicketCloseout(sequelize: Sequelize) {
  TicketCloseout.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      ticketId: { type: DataTypes.INTEGER, allowNull: false },
      findingId: { type: DataTypes.INTEGER, allowNull: false },
      method: { type: DataTypes.STRING(10), allowNull: false },
      markerId: { type: DataTypes.INTEGER, allowNull: true },
      markerLabel: { type: DataTypes.STRING(60), allowNull: true },
      offsetM: { type: DataTypes.DOUBLE, allowNull: true },
      fromEnd: { type: DataTypes.STRING(1), allowNull: true },
      enteredDistanceM: { type: DataTypes.DOUBLE, allowNull: true },
      measuredFrom: { type: DataTypes.STRING(1), allowNull: false },
      foundDistanceM: { type: DataTypes.DOUBLE, allowNull: false },
      foundFromAM: { type: DataTypes.DOUBLE, allowNull: false, field: 'found_from_a_m' },
      foundChainageM: { type: DataTypes.DOUBLE, allowNull: false },
      locatedDistanceM: { type: DataTypes.DOUBLE, allowNull: false },
      errorM: { type: DataTypes.DOUBLE, allowNull: false },
      roundTripNs: { type: DataTypes.DOUBLE, allowNull: false },
      traceVf: { type: DataTypes.DOUBLE, allowNull: false },
      impliedVf: { type: DataTypes.DOUBLE, allowNull: true },
      cableTypeId: { type: DataTypes.INTEGER, allowNull: false },
      cause: { type: DataTypes.STRING(40), allowNull: false },
      workDone: { type: DataTypes.TEXT, allowNull: false },
      calibrationId: { type: DataTypes.INTEGER, allowNull: true },
      recordedById: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'ticket_closeouts', modelName: 'TicketCloseout', underscored: true, updatedAt: false },
  );
}

export function associateTicketModels(models: { User: typeof User; Site: typeof Site; CableRun: typeof CableRun; Finding: typeof Finding }) {
  // createApp may run more than once in a process (tests); an alias can be declared only once.
  if (Ticket.associations.site) return;
  Ticket.belongsTo(models.Site, { as: 'site', foreignKey: 'siteId' });
  Ticket.belongsTo(models.CableRun, { as: 'cableRun', foreignKey: 'cableRunId' });
  Ticket.belongsTo(models.User, { as: 'assignee', foreignKey: 'assigneeId' });
  Ticket.belongsTo(models.User, { as: 'createdBy', foreignKey: 'createdById' });
  Ticket.belongsToMany(models.Finding, { through: TicketFinding, as: 'findings', foreignKey: 'ticketId', otherKey: 'findingId' });
  TicketEvent.belongsTo(models.User, { as: 'actor', foreignKey: 'actorId' });
  TicketCloseout.belongsTo(models.User, { as: 'recordedBy', foreignKey: 'recordedById' });
}
