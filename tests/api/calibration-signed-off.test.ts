import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, CableType, CableTypeChange } from '../../server/db/models';
import type { TicketDetail } from '../../shared/schemas/tickets';
import { startApi, type Client, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

/**
 * A repair's close-out files the VF implied by where the crew found the fault. That position is known to be the
 * fault only once a supervisor signs the repair off: a repair still 'fixed' may be reopened as not fixed, and its
 * found position then fed a wrong VF into the library for every later analysis of the cable type.
 */
let api: TestApi;
let tech: Client;
let sup: Client;
let planner: Client;

beforeAll(async () => {
  api = await startApi();
  tech = await api.as('technician');
  sup = await api.as('supervisor');
  planner = await api.as('planner');
});
afterAll(() => api.close());

const found = (m: number) => ({ found: { method: 'distance', fromEnd: 'A', distanceM: m }, cause: 'open-conductor', workDone: 'Jointed the pair' });

async function closedOutRepair(name: string, faultM: number, foundM: number) {
  const fx = await supervisedRun(api, name);
  const f = await confirmedFinding(api, fx.run.id, faultM);
  const ticket = (await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201)).body as TicketDetail;
  const closed = (await tech.post(`/api/tickets/${ticket.id}/closeout`, found(foundM)).expect(200)).body as TicketDetail;
  return { fx, ticketId: ticket.id, calibrationId: closed.closeouts[0].calibrationId! };
}

describe('accepting a close-out calibration', () => {
  it('is refused while its repair is fixed but not signed off, and the library is untouched; once signed off it is taken', async () => {
    const { fx, ticketId, calibrationId } = await closedOutRepair('Sign-off calibration run', 100, 102);
    expect(calibrationId).toBeGreaterThan(0);
    const before = await CableType.findByPk(fx.cable.id);
    const histories = await CableTypeChange.count({ where: { cableTypeId: fx.cable.id } });

    const listed = (await planner.get('/api/calibrations?status=pending').expect(200)).body.items.find((c: { id: number }) => c.id === calibrationId);
    expect(listed.ticketId).toBe(ticketId);
    expect(listed.acceptHeld).toBe(
      `its repair, ticket ${ticketId}, is fixed, awaiting sign-off: a close-out's found position is taken into the library once a supervisor has signed the repair off`,
    );

    const refused = await planner.post(`/api/calibrations/${calibrationId}/accept`, {}).expect(409);
    expect(refused.body.error.code).toBe('repair_not_signed_off');
    expect(refused.body.error.message).toBe(
      `Calibration #${calibrationId} cannot be accepted: its repair, ticket ${ticketId}, is fixed, awaiting sign-off: a close-out's found position is taken into the library once a supervisor has signed the repair off. Nothing was changed.`,
    );
    expect((await CableCalibration.findByPk(calibrationId))!.status).toBe('pending');
    const after = await CableType.findByPk(fx.cable.id);
    expect(after!.vf).toBe(before!.vf);
    expect(after!.vfSource).toBe(before!.vfSource);
    expect(await CableTypeChange.count({ where: { cableTypeId: fx.cable.id } })).toBe(histories);

    await sup.post(`/api/tickets/${ticketId}/status`, { to: 'signed-off' }).expect(200);
    const cable = (await planner.get(`/api/cables/${fx.cable.id}/calibrations`).expect(200)).body;
    expect(cable.items.find((c: { id: number }) => c.id === calibrationId).acceptHeld).toBeNull();
    const accepted = await planner.post(`/api/calibrations/${calibrationId}/accept`, {}).expect(200);
    expect(accepted.body.calibration.status).toBe('accepted');
    expect(accepted.body.cable.vf).toBe(Math.round(accepted.body.calibration.vf * 1e4) / 1e4);
  });

  it("is refused for good when its ticket was reopened and closed out again; the later close-out's calibration is taken after sign-off", async () => {
    const { ticketId, calibrationId: firstId } = await closedOutRepair('Reopened calibration run', 120, 121);
    await sup.post(`/api/tickets/${ticketId}/status`, { to: 'under-way', comment: 'Still open-circuit' }).expect(200);
    const again = (await tech.post(`/api/tickets/${ticketId}/closeout`, found(123)).expect(200)).body as TicketDetail;
    const secondId = again.closeouts[0].calibrationId!;
    expect(secondId).not.toBe(firstId);
    await sup.post(`/api/tickets/${ticketId}/status`, { to: 'signed-off' }).expect(200);

    const stale = await planner.post(`/api/calibrations/${firstId}/accept`, {}).expect(409);
    expect(stale.body.error.message).toBe(
      `Calibration #${firstId} cannot be accepted: ticket ${ticketId} was reopened and closed out again after this close-out, so the fault was not where it was found here; reject it. Nothing was changed.`,
    );
    expect((await CableCalibration.findByPk(firstId))!.status).toBe('pending');
    // Rejecting it stays open to the planner.
    await planner.post(`/api/calibrations/${firstId}/reject`, { reason: 'Dig at 121 m was not the fault' }).expect(200);
    expect((await planner.post(`/api/calibrations/${secondId}/accept`, {}).expect(200)).body.calibration.status).toBe('accepted');
  });

  it('holds nothing back from a calibration typed in by hand', async () => {
    const fx = await supervisedRun(api, 'Hand calibration run');
    const roundTripNs = (2 * 150) / (299_792_458 * 0.65) * 1e9;
    const made = (await tech.post('/api/calibrations', { cableTypeId: fx.cable.id, knownLengthM: 150, roundTripNs, source: 'manual' }).expect(201)).body;
    expect(made.ticketId).toBeNull();
    expect(made.acceptHeld).toBeNull();
    expect((await planner.post(`/api/calibrations/${made.id}/accept`, {}).expect(200)).body.calibration.status).toBe('accepted');
  });
});
