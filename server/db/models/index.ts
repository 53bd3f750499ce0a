import type { Sequelize } from 'sequelize';
import { associateCableCalibration, initCableCalibration } from './cable-calibration';
import { CableType, initCableType } from './cable-type';
import { associateCableTypeChange, initCableTypeChange } from './cable-type-change';
import { initSession } from './session';
import { initUser, User } from './user';

/**
 * Each feature adds its init (and associate) call here, in dependency order.
 */
export function initModels(sequelize: Sequelize) {
  initUser(sequelize);
  initSession(sequelize);
  initCableType(sequelize);
  initCableTypeChange(sequelize);
  initCableCalibration(sequelize);
  associateCableTypeChange({ CableType, User });
  associateCableCalibration({ CableType, User });
}

export { User } from './user';
export { Session } from './session';
export { CableType } from './cable-type';
export { CableTypeChange } from './cable-type-change';
export { CableCalibration } from './cable-calibration';
