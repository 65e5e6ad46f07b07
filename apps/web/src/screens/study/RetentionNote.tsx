import { Show } from 'solid-js';
import { href } from '../../ui/router.js';
import type { StudyScope } from './study-context.js';
import { allowed } from './StudyNav.js';
import { dateOnly, retentionState } from './retention.js';

/** The study's retention date for everyone; for owners, a reminder once it is near or has passed. */
export function RetentionNote(props: { studyId: string; scope: StudyScope }) {
  const until = () => props.scope.study()?.retentionUntil ?? null;
  const r = () => retentionState(until());
  const owner = () => allowed(props.scope, 'study.delete');
  return (
    <Show when={until()}>
      {(u) => (
        <>
          <p class="muted retention" data-testid="retention-date">Data kept until {dateOnly(u())}</p>
          <Show when={owner() && (r().state === 'near' || r().state === 'past')}>
            <p class="notice" role="status" data-testid="retention-reminder">
              {r().state === 'past'
                ? `The retention date of this study passed ${-r().days === 0 ? 'today' : `${-r().days} day(s) ago`}. `
                : `The retention date of this study is in ${r().days} day(s). `}
              Unless your ethics approval allows longer, export what you must keep and delete the study under{' '}
              <a href={href({ name: 'settings', studyId: props.studyId })}>Settings</a>.
            </p>
          </Show>
        </>
      )}
    </Show>
  );
}
