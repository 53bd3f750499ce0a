import type { Sequelize } from 'sequelize';
import { initCableType } from './cable-type';
import { initSession } from './session';
import { initUser } from './user';

/**
 * Each feature adds its init (and associate) call here, in dependency order.
 */
export function initModels(sequelize: Sequelize) {
  initUser(sequelize);
  initSession(sequelize);
  initCableType(sequelize);
}

export { User } from './user';
export { Session } from './session';
export { CableType } from './cable-type';
