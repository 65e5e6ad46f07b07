/**
 * GET /api/studies/:studyId/events — server-sent events telling a member's open screens that the study
 * changed outside the rooms they hold (texts added by an upload or an import; an import's codes,
 * segments and memos), on any node. Events name what changed, not its words: screens read it again
 * through the routes, which apply the reader's rights. `ready` first, then `study` events.
 */
import { Hono } from 'hono';
import { roleIn } from '../access/membership.js';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { streamStudyChannel } from './study-channel-stream.js';
import { studyRole } from './study-access.js';

export function studyEventRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));
  app.get('/:studyId/events', async (c) => {
    const { studyId } = await studyRole(deps, c, 'study.read');
    const me = c.get('session').user.id;
    const events = deps.studyEvents;
    if (!events) throw new HttpError(503, 'internal', 'Live study events are not available on this server.');
    return streamStudyChannel(c, events, studyId, async (e) =>
      // Membership now, not at connect time: someone removed since hears nothing more.
      (await roleIn(deps.db, studyId, me)) ? { event: 'study', data: JSON.stringify({ action: e.action, textIds: e.textIds }) } : 'end',
    );
  });
  return app;
}
