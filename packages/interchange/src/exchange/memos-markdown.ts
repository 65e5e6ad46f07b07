/**
 * Memos and jottings as Markdown: memos first, then jottings, each with its author, dates and what it
 * is attached to (named: the text's title, the code's path, the segment's quoted words), and its replies
 * under it as a list (who, when, what).
 */
import { codePaths, type ExMemo, type ExSegment, type StudyFrame } from './study-data.js';

export interface MemoContext {
  textTitles: Map<string, string>;
  /** Segment quotes by segment id, where known. */
  segments?: Map<string, Pick<ExSegment, 'quote'>>;
}

export function memosMarkdown(frame: Pick<StudyFrame, 'title' | 'memos' | 'codes' | 'coders'>, ctx: MemoContext): string {
  const paths = codePaths(frame.codes);
  const who = (id: string) => frame.coders.find((c) => c.id === id)?.name ?? id;
  const about = (m: ExMemo): string => {
    const a = m.attachedTo;
    switch (a.kind) {
      case 'study':
        return 'the study';
      case 'text':
        return `text “${ctx.textTitles.get(a.textId) ?? a.textId}”`;
      case 'code':
        return `code ${paths.get(a.codeId) ?? a.codeId}`;
      case 'segment': {
        const q = ctx.segments?.get(a.segmentId)?.quote;
        return `a segment of text “${ctx.textTitles.get(a.textId) ?? a.textId}”${q ? `: “${q.replace(/\s+/g, ' ').slice(0, 200)}”` : ''}`;
      }
    }
  };
  const lines = [`# Memos and jottings: ${frame.title}`, ''];
  for (const kind of ['memo', 'jotting'] as const) {
    const list = frame.memos.filter((m) => m.kind === kind).sort((a, b) => a.createdAt - b.createdAt || (a.id < b.id ? -1 : 1));
    lines.push(`## ${kind === 'memo' ? 'Memos' : 'Jottings'} (${list.length})`, '');
    for (const m of list) {
      lines.push(`### ${m.title.trim() || (kind === 'memo' ? 'Untitled memo' : 'Jotting')}`, '');
      lines.push(`- By: ${who(m.author)}`, `- Written: ${new Date(m.createdAt).toISOString()}`, `- Last changed: ${new Date(m.updatedAt).toISOString()}`, `- About: ${about(m)}`, '');
      lines.push(m.body.trim() || '_(empty)_', '');
      const replies = [...(m.replies ?? [])].sort((a, b) => a.createdAt - b.createdAt || (a.id < b.id ? -1 : 1));
      if (replies.length > 0) {
        lines.push(`#### Replies (${replies.length})`, '');
        // each reply a list item; its further lines indented to stay inside the item (CommonMark §5.2)
        for (const r of replies) lines.push(`- ${who(r.author)}, ${new Date(r.createdAt).toISOString()}: ${r.body.trim().replace(/\n/g, '\n  ') || '_(empty)_'}`);
        lines.push('');
      }
    }
  }
  return lines.join('\n');
}
