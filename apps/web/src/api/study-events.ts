/**
 * Follows a study's changes made outside the documents a screen holds (texts uploaded or imported, an
 * import's codes and segments): server-sent events from `/api/studies/:id/events`. Returns the closer.
 * EventSource reconnects by itself after a network break.
 */
export interface StudyChange {
  action: 'texts-added' | 'imported';
  textIds: string[];
}

export function watchStudy(studyId: string, onChange: (change: StudyChange) => void): () => void {
  const source = new EventSource(`/api/studies/${encodeURIComponent(studyId)}/events`);
  source.addEventListener('study', (e) => {
    try {
      onChange(JSON.parse((e as MessageEvent<string>).data) as StudyChange);
    } catch {
      onChange({ action: 'imported', textIds: [] }); // unreadable news is still news: read again
    }
  });
  return () => source.close();
}
