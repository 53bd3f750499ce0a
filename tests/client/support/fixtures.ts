import { http, HttpResponse } from 'msw';
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
  ticketId: null,
  acceptHeld: null,
  note: null,
  status: 'pending',
  submittedBy: { id: 2, name: 'Ines Ravelo' },
  reviewedBy: null,
  reviewedAt: null,
  reviewReason: null,
  createdAt: '2026-12-03T06:28:00.000Z',
  ...changes,
});

/** A technician, as `GET /api/auth/me` gives them. */
export const technicianMe = {
  id: 2,
  email: 'ada@example.com',
  name: 'Ada Field',
  role: 'technician',
  active: true,
  mustChangePassword: false,
  unitPreference: 'm',
};

/** One confirmed finding (an open at 120 m on run HN-3) as the findings list gives it; its route words name its id. */
export const listedFinding = (id: number) => ({
  id,
  siteId: 1,
  siteName: 'Harrowmere North',
  cableRunId: 3,
  cableRunName: 'HN-3',
  traceId: 9,
  eventIndex: 0,
  end: 'A',
  status: 'confirmed',
  kind: 'open',
  distanceM: 120,
  confirmedBy: { id: 2, name: 'Ada Field' },
  confirmedAt: '2026-12-01T10:00:00.000Z',
  routePosition: null,
  routePositionText: `finding ${id} route words`,
});

/** The demo planner, as `GET /api/auth/me` gives them. */
export const demoPlanner = {
  id: 4,
  email: 'planner@example.com',
  name: 'Priya Castellanos',
  role: 'planner',
  active: true,
  mustChangePassword: false,
  unitPreference: 'm',
};

/**
 * The msw handlers the calibration review page reads: the review queue holds `queue()` and cable 3 (the solid
 * PE coax, library VF 0.66 ± 2 %) lists `cable()`, each as it stands when asked.
 */
export const calibrationReviewHandlers = (queue: () => CalibrationView[], cable: () => CalibrationView[] = queue) => [
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.get('*/api/calibrations', () => {
    const items = queue();
    return HttpResponse.json({ items, total: items.length, page: 1, pageSize: 20 });
  }),
  http.get('*/api/cables/3/calibrations', () =>
    HttpResponse.json({
      libraryVf: 0.66,
      libraryVfTolerance: 0.02,
      stats: noCalibrations,
      acceptedStats: noCalibrations,
      counts: { pending: 1, accepted: 0, rejected: 0 },
      items: cable(),
    }),
  ),
];

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
