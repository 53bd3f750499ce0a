import type { CalibrationView } from '../../../shared/schemas/cables';
import type { TicketDetail } from '../../../shared/schemas/tickets';

/** A calibration's statistics with nothing accepted yet. */
export const noCalibrations = { count: 0, mean: null, stdDev: null, min: null, max: null };

/**
 * A close-out calibration of the solid PE 50 Ω coax waiting for review (VF 0.6462 against the library's 0.66),
 * submitted by the demo technician unless `changes` says otherwise.
 */
export const pendingCalibration = (changes: Partial<CalibrationView> = {}): CalibrationView => ({
  id: 2,
  cableType: { id: 3, name: 'Solid PE coax, 50 Ω', currentVf: 0.66 },
  knownLengthM: 43.5,
  roundTripNs: 449.1,
  vf: 0.6462,
  libraryVf: 0.66,
  deviation: -0.0209,
  source: 'repair-closeout',
  traceId: 6,
  note: null,
  status: 'pending',
  submittedBy: { id: 2, name: 'Ines Ravelo' },
  reviewedBy: null,
  reviewedAt: null,
  reviewReason: null,
  createdAt: '2026-12-03T06:28:00.000Z',
  ...changes,
});

/** Radio mast feeder BF-R1 of the demo: 120 m installed, 1.5 m and 2 m coiled at its two markers (116.5 m of route). */
export const mastFeederTicket = {
  id: 4,
  cableRun: {
    id: 3,
    name: 'Radio mast feeder BF-R1',
    installedLengthM: 120,
    endALabel: 'Control kiosk',
    endBLabel: 'Telemetry radio mast',
    markers: [
      { id: 11, label: 'HH-A', kind: 'handhole', chainageM: 48, slackM: 1.5 },
      { id: 12, label: 'Mast foot', kind: 'other', chainageM: 110, slackM: 2 },
    ],
  },
  findings: [{ id: 5, kind: 'short-circuit', measuredFrom: 'B', distanceM: 44.4, roundTripNs: 449.1, vf: 0.66 }],
} as unknown as TicketDetail;
