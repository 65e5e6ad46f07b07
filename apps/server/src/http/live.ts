/**
 * Tells open sync connections that something their grant was made from has changed.
 * Placeholder until i8-live-access lands `deps.liveAccess`; every call site goes through here.
 */
import type { AppDeps } from './context.js';

export interface AccessChange {
  studyId?: string;
  userId?: string;
  roomIds?: readonly string[];
}

export async function accessChanged(deps: AppDeps, change: AccessChange): Promise<void> {
  const live = (deps as AppDeps & { liveAccess?: { changed(c: AccessChange): Promise<void> } }).liveAccess;
  await live?.changed(change);
}
