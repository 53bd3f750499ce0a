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
} as const;
