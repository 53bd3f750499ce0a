import type { AppContext } from '../context';
import { IdParam } from '../http/params';
import { SiteInputSchema, SiteListQuerySchema, SiteUpdateSchema } from '../../shared/schemas/sites';
import { ApiRouter, handle } from '../http/api-router';
import * as sites from './sites.service';


export function siteRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/sites');
  r.get('/', 'sites:read', handle((req) => sites.listSites(SiteListQuerySchema.parse(req.query))));
  r.get('/supervisor-choices', 'sites:write', handle(() => sites.supervisorChoices()));
  r.get('/:id', 'sites:read', handle((req) => sites.getSite(IdParam.parse(req.params).id)));
  r.post(
    '/',
    'sites:write',
    handle(async (req, res) => {
      const site = await sites.createSite(SiteInputSchema.parse(req.body), ctx.sequelize);
      res.status(201);
      return site;
    }),
  );
  r.put('/:id', 'sites:write', handle((req) => sites.updateSite(IdParam.parse(req.params).id, SiteUpdateSchema.parse(req.body), ctx.sequelize)));
  return r;
}
