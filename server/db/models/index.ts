import type { Sequelize } from 'sequelize';
import { associateCableCalibration, initCableCalibration } from './cable-calibration';
import { CableType, initCableType } from './cable-type';
import { associateCableTypeChange, initCableTypeChange } from './cable-type-change';
import { initMailJob } from './mail-job';
import { associateMeasurement, initMeasurement } from './measurement';
import { initOutboxMessage } from './outbox-message';
import { CableRun, initCableRun } from './cable-run';
import { associateFieldModels } from './field-associations';
import { Finding, initFinding } from './finding';
import { associateFindingDecision, initFindingDecision } from './finding-decision';
import { initRouteMarker } from './route-marker';
import { initSession } from './session';
import { initSite, Site } from './site';
import { initSiteSupervisor } from './site-supervisor';
import { associateTicketModels, initTicket, initTicketCloseout, initTicketEvent, initTicketFinding } from './ticket';
import { initTrace } from './trace';
import { associateTraceArchiveEvent, initTraceArchiveEvent } from './trace-archive-event';
import { associateTraceOutcome, initTraceOutcome } from './trace-outcome';
import { initUploadReceipt } from './upload-receipt';
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
  initSite(sequelize);
  initSiteSupervisor(sequelize);
  initCableRun(sequelize);
  initRouteMarker(sequelize);
  initTrace(sequelize);
  initUploadReceipt(sequelize);
  initFinding(sequelize);
  initFindingDecision(sequelize);
  associateFieldModels();
  initMailJob(sequelize);
  initOutboxMessage(sequelize);
  initMeasurement(sequelize);
  initTicket(sequelize);
  initTicketFinding(sequelize);
  initTicketEvent(sequelize);
  initTicketCloseout(sequelize);
  associateTicketModels({ User, Site, CableRun, Finding });
  associateCableTypeChange({ CableType, User });
  associateCableCalibration({ CableType, User });
  associateMeasurement({ User });
  associateFindingDecision({ User });
  initTraceOutcome(sequelize);
  initTraceArchiveEvent(sequelize);
  associateTraceOutcome({ User });
  associateTraceArchiveEvent({ User });
}

export { User } from './user';
export { Session } from './session';
export { CableType } from './cable-type';
export { CableTypeChange } from './cable-type-change';
export { CableCalibration } from './cable-calibration';
export { MailJob } from './mail-job';
export { OutboxMessage } from './outbox-message';
export { Site } from './site';
export { SiteSupervisor } from './site-supervisor';
export { CableRun } from './cable-run';
export { RouteMarker } from './route-marker';
export { Trace } from './trace';
export { UploadReceipt } from './upload-receipt';
export { Finding } from './finding';
export { FindingDecision } from './finding-decision';
export { Ticket, TicketFinding, TicketEvent, TicketCloseout } from './ticket';
export { Measurement } from './measurement';
export { TraceOutcome } from './trace-outcome';
export { TraceArchiveEvent } from './trace-archive-event';
