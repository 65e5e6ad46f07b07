/** The review screen's calls: layer comparison and comment threads (shapes as the server's OpenAPI describes them). */
import type { Comparison as ModelComparison } from '@gloss/model';
import { call } from '../../api/client.js';

const enc = encodeURIComponent;

export type { ComparisonEntry } from '@gloss/model';
export type Category = 'missed' | 'extra' | 'otherCode' | 'otherBoundary';
/** The model's comparison as the route sends it, with the layers compared and the categories in words. */
export type Comparison = ModelComparison & {
  definitions: Record<Category | 'overlap' | 'source', string>;
  layer: { room: string; coderId: string };
  reference: { room: string; coderId: string };
};

export interface CommentOut {
  id: string;
  author: { id: string | null; name: string };
  body: string;
  createdAt: string;
}
export interface Thread extends CommentOut {
  textId: string;
  textTitle?: string;
  layer: string;
  coderId: string;
  segmentId: string;
  quote: string | null;
  resolvedAt: string | null;
  resolvedBy: string | null;
  replies: CommentOut[];
}

export const reviewApi = {
  compare: async (textId: string, layer: string, reference: string, tolerance: number) =>
    (await call('GET', `/api/texts/${enc(textId)}/comparison?layer=${enc(layer)}&reference=${enc(reference)}&tolerance=${tolerance}`)) as Comparison,
  threads: async (textId: string) => ((await call('GET', `/api/texts/${enc(textId)}/comments`)) as { threads: Thread[] }).threads,
  feedback: async (studyId: string) => ((await call('GET', `/api/studies/${enc(studyId)}/feedback`)) as { threads: Thread[] }).threads,
  startThread: async (textId: string, layer: string, segmentId: string, body: string) =>
    ((await call('POST', `/api/texts/${enc(textId)}/comments`, { layer, segmentId, body })) as { thread: Thread }).thread,
  reply: async (textId: string, parentId: string, body: string) =>
    ((await call('POST', `/api/texts/${enc(textId)}/comments`, { parentId, body })) as { thread: Thread }).thread,
  setResolved: async (threadId: string, resolved: boolean) =>
    ((await call('POST', `/api/comments/${enc(threadId)}/${resolved ? 'resolve' : 'reopen'}`)) as { thread: Thread }).thread,
};

/** Calls `onChange` whenever a comment the reader may see changes (server-sent events); returns the closer. */
export function watchComments(studyId: string, onChange: () => void): () => void {
  const source = new EventSource(`/api/studies/${enc(studyId)}/comments/events`);
  source.addEventListener('comment', onChange);
  return () => source.close();
}
