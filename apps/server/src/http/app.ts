/** The hono application: JSON API under /api, the web app at /. */
import { Hono } from 'hono';
import type { AppDeps, AppEnv } from './context.js';
import { errorBody, onError, onNotFound } from './errors.js';
import { auditRoutes } from './audit.js';
import { limitBody } from './body-limit.js';
import { healthRoutes } from './health.js';
import { memberRoutes } from './members.js';
import { csrf } from './middleware.js';
import { openApiRoutes } from './openapi.js';
import { sessionRoutes } from './session.js';
import { staticRoutes } from './static.js';
import { studyRoutes } from './studies.js';
import { studyTextRoutes, textRoutes } from './texts.js';
import { agreementRoutes } from './agreement.js';
import { importRoutes } from './imports.js';
import { segmentRoutes } from './segments.js';
import { comparisonRoutes } from './comparison.js';
import { commentRoutes } from './comments.js';
import { versionRoutes } from './versions.js';
import { setupRoutes } from './setup.js';
import { accountLinkRoutes } from './account-links.js';
import { invitationRoutes } from './invitations.js';
import { exchangeRoutes, lossesRoutes } from './exchange.js';
import { analysisRoutes } from './analysis.js';
import { roundRoutes, studyRoundRoutes } from './rounds.js';
import { studySupervisionRoutes, textReferenceRoutes } from './supervision.js';

export function buildApp(deps: AppDeps, log: (err: unknown) => void = (err) => console.error(err)) {
  const app = new Hono<AppEnv>();
  app.onError(onError(log));

  const api = new Hono<AppEnv>();
  api.use('*', limitBody(deps.config.maxBodyBytes));
  api.use('*', csrf(deps));
  api.route('/', healthRoutes(deps));
  api.route('/', openApiRoutes());
  api.route('/', sessionRoutes(deps));
  api.route('/setup', setupRoutes(deps));
  api.route('/', accountLinkRoutes(deps));
  api.route('/studies/:studyId/invitations', invitationRoutes(deps));
  api.route('/studies', exchangeRoutes(deps));
  api.route('/studies', analysisRoutes(deps));
  api.route('/exchange', lossesRoutes());
  api.route('/studies', studyRoutes(deps));
  api.route('/studies/:studyId/members', memberRoutes(deps));
  api.route('/studies/:studyId/audit', auditRoutes(deps));
  api.route('/studies/:studyId/texts', studyTextRoutes(deps));
  api.route('/texts', textRoutes(deps));
  api.route('/studies/:studyId/texts/import', importRoutes(deps));
  api.route('/studies/:studyId/agreement', agreementRoutes(deps));
  api.route('/texts', segmentRoutes(deps));
  api.route('/texts', comparisonRoutes(deps));
  api.route('/texts', textReferenceRoutes(deps));
  api.route('/studies/:studyId', studySupervisionRoutes(deps));
  api.route('/', commentRoutes(deps));
  api.route('/documents', versionRoutes(deps));
  api.route('/studies/:studyId/rounds', studyRoundRoutes(deps));
  api.route('/rounds', roundRoutes(deps));
  api.notFound(onNotFound);
  api.all('*', onNotFound);
  app.route('/api', api);
  // Sync lives on the upgrade event; a plain GET there is a client mistake, not a web page.
  app.all('/sync/*', (c) => c.json(errorBody('bad_request', 'Open /sync/<room> as a WebSocket.'), 426 as never));
  app.route('/', staticRoutes(deps.config.webDist));
  app.notFound(onNotFound);
  return app;
}
