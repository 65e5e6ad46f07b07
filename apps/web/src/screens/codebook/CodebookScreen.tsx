import type { Me } from '../../api/types.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';

export function CodebookScreen(props: { studyId: string; scope: StudyScope; me: Me; textId?: string }) {
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="codebook" />
    </main>
  );
}
