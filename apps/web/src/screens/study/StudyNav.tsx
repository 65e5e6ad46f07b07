import { For, Show } from 'solid-js';
import { href } from '../../ui/router.js';
import type { StudyScope } from './study-context.js';
import { RetentionNote } from './RetentionNote.js';

export type StudyTab = 'study' | 'codebook' | 'memos' | 'members' | 'review' | 'supervision' | 'coding' | 'rounds' | 'agreement' | 'analysis' | 'cases' | 'upload' | 'versions' | 'audit' | 'deid' | 'settings';

/** What the signed-in person may do in the study, as the server listed it (the server still decides). */
export function allowed(scope: StudyScope, action: string): boolean {
  const p = scope.study()?.permissions;
  return Array.isArray(p) && p.includes(action);
}

const TABS: Array<{ name: Exclude<StudyTab, 'coding' | 'upload'>; label: string; needs?: string; roles?: string[] }> = [
  { name: 'study', label: 'Texts' },
  { name: 'cases', label: 'Cases' },
  { name: 'codebook', label: 'Codebook' },
  { name: 'memos', label: 'Memos' },
  { name: 'review', label: 'Review' },
  { name: 'supervision', label: 'Supervision' },
  { name: 'members', label: 'Members' },
  { name: 'rounds', label: 'Rounds' },
  // the server serves study-wide figures to owners, leads and observers only
  { name: 'agreement', label: 'Agreement', roles: ['owner', 'lead', 'observer'] },
  { name: 'analysis', label: 'Analysis' },
  { name: 'versions', label: 'Versions' },
  { name: 'audit', label: 'Audit log', needs: 'audit.view' },
  { name: 'deid', label: 'De-identify', needs: 'deid.manage' },
  { name: 'settings', label: 'Settings' },
];

/** The study's title and its screens. */
export function StudyNav(props: { studyId: string; scope: StudyScope; current: StudyTab }) {
  return (
    <header class="study-head">
      <p class="crumbs"><a href={href({ name: 'studies' })}>Studies</a> /</p>
      <h1>
        <Show when={props.scope.study()} fallback="Study">{(s) => s().title}</Show>
      </h1>
      <RetentionNote studyId={props.studyId} scope={props.scope} />
      <nav aria-label="Study screens" class="tabs">
        <For each={TABS.filter((t) => (!t.needs || allowed(props.scope, t.needs)) && (!t.roles || t.roles.includes(props.scope.study()?.role ?? '')))}>
          {(t) => (
            <a href={href({ name: t.name, studyId: props.studyId } as never)} aria-current={props.current === t.name || (props.current === 'upload' && t.name === 'study') ? 'page' : undefined}>{t.label}</a>
          )}
        </For>
      </nav>
    </header>
  );
}
