import { Show } from 'solid-js';
import { href } from '../../ui/router.js';
import type { StudyScope } from './study-context.js';

export type StudyTab = 'study' | 'codebook' | 'memos' | 'members' | 'review' | 'coding' | 'rounds' | 'agreement' | 'analysis';

/** The study's title and its screens. */
export function StudyNav(props: { studyId: string; scope: StudyScope; current: StudyTab }) {
  const tab = (name: Exclude<StudyTab, 'coding'>, label: string) => (
    <a href={href({ name, studyId: props.studyId } as never)} aria-current={props.current === name ? 'page' : undefined}>{label}</a>
  );
  return (
    <header class="study-head">
      <p class="crumbs"><a href={href({ name: 'studies' })}>Studies</a> /</p>
      <h1>
        <Show when={props.scope.study()} fallback="Study">{(s) => s().title}</Show>
      </h1>
      <nav aria-label="Study screens" class="tabs">
        {tab('study', 'Texts')}
        {tab('codebook', 'Codebook')}
        {tab('memos', 'Memos')}
        {tab('review', 'Review')}
        {tab('members', 'Members')}
        {tab('rounds', 'Rounds')}
        {/* the server serves study-wide figures to owners, leads and observers only */}
        <Show when={['owner', 'lead', 'observer'].includes(props.scope.study()?.role ?? '')}>{tab('agreement', 'Agreement')}</Show>
        {tab('analysis', 'Analysis')}
      </nav>
    </header>
  );
}
