/** A round's agreement: the round's own participants, texts, unit and statistic (the server fixes them). */
import { agreementApi } from '../../api/agreement.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { href } from '../../ui/router.js';
import { AgreementView } from '../agreement/AgreementScreen.js';
import { useRound } from './round-data.js';

export function RoundAgreement(props: { studyId: string; roundId: string; scope: StudyScope }) {
  const { round } = useRound(() => props.roundId);
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="rounds" />
      <p class="crumbs">
        <a href={href({ name: 'rounds', studyId: props.studyId })}>Rounds</a> /{' '}
        <a href={href({ name: 'round', studyId: props.studyId, roundId: props.roundId })}>{round()?.name ?? 'Round'}</a> /
      </p>
      <AgreementView
        heading={`Agreement in ${round()?.name ?? 'this round'}`}
        scope={{
          fixed: true,
          load: (o) => agreementApi.round(props.roundId, o),
          keep: (s) => s.round === undefined || s.round === props.roundId,
          linkTo: (textId, at) => href({ name: 'round-text', studyId: props.studyId, roundId: props.roundId, textId, at }),
        }}
      />
    </main>
  );
}
