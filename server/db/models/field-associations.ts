import { CableRun } from './cable-run';
import { CableType } from './cable-type';
import { Finding } from './finding';
import { RouteMarker } from './route-marker';
import { Site } from './site';
import { SiteSupervisor } from './site-supervisor';
import { Trace } from './trace';
import { User } from './user';

/** Associations of the field workflow's models; called once after every model is initialised. */
export function associateFieldModels() {
  Site.belongsToMany(User, { through: SiteSupervisor, as: 'supervisors', foreignKey: 'siteId', otherKey: 'userId' });
  Site.hasMany(CableRun, { as: 'cableRuns', foreignKey: 'siteId' });
  CableRun.belongsTo(Site, { as: 'site', foreignKey: 'siteId' });
  CableRun.belongsTo(CableType, { as: 'cableType', foreignKey: 'cableTypeId' });
  CableRun.hasMany(RouteMarker, { as: 'markers', foreignKey: 'cableRunId' });
  Trace.belongsTo(CableRun, { as: 'cableRun', foreignKey: 'cableRunId' });
  Trace.belongsTo(User, { as: 'uploadedBy', foreignKey: 'uploadedById' });
  Finding.belongsTo(Site, { as: 'site', foreignKey: 'siteId' });
  Finding.belongsTo(CableRun, { as: 'cableRun', foreignKey: 'cableRunId' });
  Finding.belongsTo(Trace, { as: 'trace', foreignKey: 'traceId' });
  Finding.belongsTo(User, { as: 'confirmedBy', foreignKey: 'confirmedById' });
}
