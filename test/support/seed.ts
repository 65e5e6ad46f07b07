/**
 * A small invented study for tests: one account per role (plus an outsider), a study, one text.
 * Names and the transcript are made up.
 */
import type { Db } from '@gloss/db';
import { addMember, addTextFromTranscript, createStudy, createUser, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';

export const PASSWORD = 'seed-password-1';

export const PEOPLE = {
  owner: { email: 'ines.owner@example.test', name: 'Ines Halvorsen' },
  lead: { email: 'tomas.lead@example.test', name: 'Tomas Ekwueme' },
  coder: { email: 'rua.coder@example.test', name: 'Rua Taliaferro' },
  coder2: { email: 'bo.coder@example.test', name: 'Bo Lindqvist' },
  trainee: { email: 'mei.trainee@example.test', name: 'Mei Okonkwo' },
  observer: { email: 'sol.observer@example.test', name: 'Sol Abernathy' },
  outsider: { email: 'pat.outsider@example.test', name: 'Pat Outsider' },
} as const;
export type Person = keyof typeof PEOPLE;

export interface BasicSeed {
  users: Record<Person, { id: string; email: string; name: string }>;
  studyId: string;
  textId: string;
  textRoom: string;
  codebookRoom: string;
  memosRoom: string;
}

export async function seedBasic(db: Db): Promise<BasicSeed> {
  const entries = await Promise.all(
    (Object.keys(PEOPLE) as Person[]).map(async (key) => [key, await createUser(db, { ...PEOPLE[key], password: PASSWORD })] as const),
  );
  const users = Object.fromEntries(entries) as unknown as BasicSeed['users'];
  const study = await createStudy(db, { title: 'Harbour town allotments', createdBy: users.owner.id });
  const roles = { lead: 'lead', coder: 'coder', coder2: 'coder', trainee: 'trainee', observer: 'observer' } as const;
  for (const [person, role] of Object.entries(roles)) await addMember(db, study.id, users[person as Person].id, role, users.owner.id);
  const text = await addTextFromTranscript(db, study.id, {
    title: 'Allotment interview 1',
    transcript: transcriptFromPlainText('Interviewer: How did you start?\nP01: My neighbour lent me a spade and a plot.'),
    sourceFormat: 'txt',
    createdBy: users.owner.id,
  });
  return { users, studyId: study.id, textId: text.id, textRoom: text.room, codebookRoom: study.codebookRoom, memosRoom: study.memosRoom };
}
