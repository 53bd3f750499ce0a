/**
 * The typed path map: every link and route takes its path from here.
 * `pattern` is for the router, `to(...)` builds a link.
 */
export const paths = {
  home: { pattern: '/', to: () => '/' },
  signIn: { pattern: '/sign-in', to: (next?: string) => (next ? `/sign-in?next=${encodeURIComponent(next)}` : '/sign-in') },
  notAllowed: { pattern: '/not-allowed', to: () => '/not-allowed' },
  account: { pattern: '/account', to: () => '/account' },
  adminUsers: { pattern: '/admin/users', to: () => '/admin/users' },
  outbox: { pattern: '/outbox', to: () => '/outbox' },
  tickets: { pattern: '/tickets', to: () => '/tickets' },
  ticket: { pattern: '/tickets/:ticketId', to: (ticketId: number) => `/tickets/${ticketId}` },
  ticketSheet: { pattern: '/tickets/:ticketId/sheet', to: (ticketId: number) => `/tickets/${ticketId}/sheet` },
  dashboard: { pattern: '/dashboard', to: () => '/dashboard' },
  upload: { pattern: '/upload', to: () => '/upload' },
  device: { pattern: '/device', to: () => '/device' },
  deviceAnalyse: {
    pattern: '/device/analyse',
    /** One analysed item, or the form with where the trace was taken already chosen (site, run, end). */
    to: (itemId?: string, where?: { site?: string; run?: string; end?: string }) => {
      if (itemId) return `/device/analyse?item=${encodeURIComponent(itemId)}`;
      const q = new URLSearchParams(Object.entries(where ?? {}).filter(([, v]) => !!v) as Array<[string, string]>).toString();
      return q ? `/device/analyse?${q}` : '/device/analyse';
    },
  },
  traces: { pattern: '/traces', to: () => '/traces' },
  trace: { pattern: '/traces/:traceId', to: (traceId: number) => `/traces/${traceId}` },
  findings: { pattern: '/findings', to: () => '/findings' },
  finding: { pattern: '/findings/:findingId', to: (findingId: number) => `/findings/${findingId}` },
  sites: { pattern: '/sites', to: () => '/sites' },
  site: { pattern: '/sites/:siteId', to: (siteId: number) => `/sites/${siteId}` },
  siteRun: { pattern: '/sites/:siteId/runs/:runId', to: (siteId: number, runId: number) => `/sites/${siteId}/runs/${runId}` },
  cables: { pattern: '/cables', to: () => '/cables' },
  cableNew: { pattern: '/cables/new', to: () => '/cables/new' },
  cableCalculator: { pattern: '/cables/calculator', to: () => '/cables/calculator' },
  cableImport: { pattern: '/cables/import', to: () => '/cables/import' },
  cable: { pattern: '/cables/:cableId', to: (cableId: number) => `/cables/${cableId}` },
  calibrations: { pattern: '/calibrations', to: () => '/calibrations' },
} as const;
