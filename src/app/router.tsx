import { createBrowserRouter, type RouteObject } from 'react-router-dom';
import { Loading } from '../components/ui/notice';
import { AppShell } from './layout/app-shell';
import { RequirePermission } from './layout/require-permission';
import { paths } from './paths';
import { NotAllowedPage } from './routes/not-allowed';
import { NotFoundPage } from './routes/not-found';
import { SignInPage } from './routes/sign-in';
import type { Permission } from '../../shared/auth/permissions';
import type { ComponentType } from 'react';

/** A page loaded on demand, shown only to roles with the permission. */
function page(load: () => Promise<{ default: ComponentType }>, permission?: Permission): Pick<RouteObject, 'lazy'> {
  return {
    lazy: async () => {
      const { default: Component } = await load();
      return {
        Component: permission
          ? () => (
              <RequirePermission permission={permission}>
                <Component />
              </RequirePermission>
            )
          : Component,
      };
    },
  };
}

export const routes: RouteObject[] = [
  { path: paths.signIn.pattern, element: <SignInPage /> },
  {
    element: <AppShell />,
    // Pages load on demand: until the first one has, the first paint is this line, not a blank page.
    hydrateFallbackElement: <Loading what="Opening Rholog" />,
    children: [
      { path: paths.home.pattern, ...page(() => import('./routes/home')) },
      { path: paths.account.pattern, ...page(() => import('./routes/account')) },
      { path: paths.notAllowed.pattern, element: <NotAllowedPage /> },
      { path: paths.adminUsers.pattern, ...page(() => import('./routes/admin-users'), 'users:manage') },
      { path: paths.outbox.pattern, ...page(() => import('./routes/outbox'), 'outbox:own') },
      { path: paths.tickets.pattern, ...page(() => import('./routes/tickets'), 'tickets:read') },
      { path: paths.ticket.pattern, ...page(() => import('./routes/ticket'), 'tickets:read') },
      { path: paths.ticketSheet.pattern, ...page(() => import('./routes/ticket-sheet'), 'tickets:read') },
      { path: paths.dashboard.pattern, ...page(() => import('./routes/dashboard'), 'dashboard:read') },
      { path: paths.upload.pattern, ...page(() => import('./routes/upload'), 'traces:upload') },
      { path: paths.device.pattern, ...page(() => import('./routes/device'), 'traces:upload') },
      { path: paths.deviceAnalyse.pattern, ...page(() => import('./routes/device-analyse'), 'traces:upload') },
      { path: paths.traces.pattern, ...page(() => import('./routes/traces'), 'traces:read') },
      { path: paths.trace.pattern, ...page(() => import('./routes/trace'), 'traces:read') },
      { path: paths.findings.pattern, ...page(() => import('./routes/findings'), 'findings:read') },
      { path: paths.finding.pattern, ...page(() => import('./routes/finding'), 'findings:read') },
      { path: paths.sites.pattern, ...page(() => import('./routes/sites'), 'sites:read') },
      { path: paths.site.pattern, ...page(() => import('./routes/site'), 'sites:read') },
      { path: paths.siteRun.pattern, ...page(() => import('./routes/site-run'), 'sites:read') },
      { path: paths.cables.pattern, ...page(() => import('./routes/cables'), 'cables:read') },
      { path: paths.cableNew.pattern, ...page(() => import('./routes/cable-new'), 'cables:write') },
      { path: paths.cableCalculator.pattern, ...page(() => import('./routes/cable-calculator'), 'cables:read') },
      { path: paths.cableImport.pattern, ...page(() => import('./routes/cable-import'), 'cables:write') },
      { path: paths.cable.pattern, ...page(() => import('./routes/cable'), 'cables:read') },
      { path: paths.calibrations.pattern, ...page(() => import('./routes/calibrations'), 'calibrations:review') },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
];

export const createRouter = () => createBrowserRouter(routes);
