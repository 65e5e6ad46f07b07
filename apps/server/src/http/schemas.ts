/** The API's request and response shapes, in one place: routes validate with them, openapi.ts describes them. */
import { z } from 'zod';
import { MAX_PASSWORD_LENGTH } from '../auth/passwords.js';

export const RoleSchema = z.enum(['owner', 'lead', 'coder', 'trainee', 'observer']);
export const StudyModeSchema = z.enum(['standard', 'reflexive']);

export const SignInBody = z.object({
  email: z.string().trim().min(3).max(320),
  password: z.string().min(1).max(MAX_PASSWORD_LENGTH),
});

export const NewStudyBody = z.object({
  title: z.string().trim().min(1).max(200),
  description: z.string().max(5000).optional(),
  mode: StudyModeSchema.optional(),
  retentionUntil: z.iso.datetime({ offset: true }).nullable().optional(),
  ethicsNote: z.string().max(10_000).optional(),
});

export const UpdateStudyBody = z
  .object({
    title: z.string().trim().min(1).max(200).optional(),
    description: z.string().max(5000).optional(),
    mode: StudyModeSchema.optional(),
    /** When the study's data should be deleted (DESIGN §8); null clears it. */
    retentionUntil: z.iso.datetime({ offset: true }).nullable().optional(),
    /** Ethics approval and consent terms, in the study's own words. */
    ethicsNote: z.string().max(10_000).optional(),
    /** true archives the study (out of the working list, data kept); false brings it back. */
    archived: z.boolean().optional(),
  })
  .refine((b) => Object.keys(b).length > 0, { message: 'Nothing to change.' });

export const AddMemberBody = z.object({ email: z.string().trim().min(3).max(320), role: RoleSchema });
export const ChangeRoleBody = z.object({ role: RoleSchema });

export const NewTextBody = z.object({
  title: z.string().trim().min(1).max(300),
  /** Plain-text transcript; "Name: words" lines become speaker turns. */
  content: z.string().min(1).max(4_000_000),
});

export const ErrorResponse = z.object({
  error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }),
});
export const Health = z.object({
  ok: z.boolean(),
  db: z.enum(['pglite', 'postgres']),
  /** Start-up steps still pending (with ok false and status 503). */
  waiting: z.array(z.string()).optional(),
  /** Open sync connections and loaded rooms: shown to owners of a study only. */
  sync: z.object({ connections: z.number(), rooms: z.number() }).passthrough().optional(),
});
export const Me = z.object({ id: z.uuid(), email: z.string(), name: z.string() });
export const StudySummary = z.object({
  id: z.uuid(),
  title: z.string(),
  description: z.string(),
  mode: StudyModeSchema,
  role: RoleSchema,
  createdAt: z.string(),
  archivedAt: z.string().nullable(),
});
export const Study = StudySummary.extend({
  retentionUntil: z.string().nullable(),
  ethicsNote: z.string(),
  codebookRoom: z.uuid(),
  memosRoom: z.uuid(),
  memosView: z.string().describe('Which memos entries this reader receives, as a key that changes with it: a memos copy made for another key is stale (connect with ?memosView=<key>; the server closes a stale one with 4409).'),
  permissions: z.array(z.string()),
});
export const Member = z.object({ userId: z.uuid(), name: z.string(), email: z.string(), role: RoleSchema });
export const TextSummary = z.object({
  id: z.uuid(),
  title: z.string(),
  room: z.uuid(),
  sourceFormat: z.string(),
  wordCount: z.number().int(),
  createdAt: z.string(),
});
/** A layer as GET /api/texts/:id and GET /api/rounds/:id list it. */
export const LayerEntry = z.object({
  room: z.uuid(),
  coderId: z.uuid().nullable(),
  name: z.string(),
  mine: z.boolean(),
  canWrite: z.boolean(),
  round: z.uuid().nullable(),
  kind: z.enum(['coder', 'consensus']),
});
export const TextDetail = TextSummary.extend({
  studyId: z.uuid(),
  canWrite: z.boolean(),
  /** The open round this text is in, if any, and whether the caller codes in it. */
  round: z.object({ id: z.uuid(), name: z.string(), number: z.number().int(), phase: z.enum(['independent', 'revealed', 'closed']), participant: z.boolean() }).nullable(),
  layers: z.array(LayerEntry),
});
export const AuditEntry = z.object({
  id: z.number().int(),
  at: z.string(),
  userId: z.uuid().nullable(),
  userName: z.string().nullable(),
  action: z.string(),
  target: z.string().nullable(),
  detail: z.record(z.string(), z.unknown()).nullable(),
});

const uuidList = (what: string, min: number) =>
  z
    .array(z.uuid())
    .min(min, { message: `name at least ${min} ${what}` })
    .max(500)
    .refine((ids) => new Set(ids.map((id) => id.toLowerCase())).size === ids.length, { message: `each ${what.replace(/s$/, '')} once` });

/** POST /api/studies/:id/rounds (issue 8 item 10: scripts outside the project rely on these names). */
export const NewRoundBody = z.object({
  name: z.string().trim().min(1).max(200),
  purpose: z.string().max(2000).optional(),
  textIds: uuidList('texts', 1),
  participantIds: uuidList('participants', 2),
  unit: z.enum(['turn', 'paragraph', 'sentence', 'character', 'span']),
  statistic: z.enum(['krippendorff-alpha', 'cohen-kappa', 'scott-pi', 'fleiss-kappa', 'percent-agreement']),
});

export const RoundPhaseSchema = z.enum(['independent', 'revealed', 'closed']);
export const RoundSummary = z.object({
  id: z.uuid(),
  studyId: z.uuid(),
  number: z.number().int(),
  name: z.string(),
  purpose: z.string(),
  unit: z.string(),
  statistic: z.string(),
  phase: RoundPhaseSchema,
  codebookVersionId: z.uuid().nullable(),
  createdAt: z.string(),
  revealedAt: z.string().nullable(),
  closedAt: z.string().nullable(),
  createdBy: z.object({ id: z.uuid(), name: z.string() }).nullable(),
  texts: z.array(z.object({ id: z.uuid(), title: z.string(), wordCount: z.number().int() })),
  participants: z.array(z.object({ id: z.uuid(), name: z.string() })),
  me: z.object({ participant: z.boolean(), canManage: z.boolean(), done: z.array(z.uuid()) }),
});
export const RoundDetail = RoundSummary.extend({
  texts: z.array(z.object({ id: z.uuid(), title: z.string(), wordCount: z.number().int(), room: z.uuid(), consensusRoom: z.uuid().nullable(), layers: z.array(LayerEntry) })),
});
export const RoundProgress = z.object({
  roundId: z.uuid(),
  phase: RoundPhaseSchema,
  rows: z.array(
    z.object({
      participantId: z.uuid(),
      name: z.string(),
      textId: z.uuid(),
      title: z.string(),
      words: z.number().int().describe('words in the text'),
      wordsRead: z.number().int().describe('words of the speaker turns that have been on the participant’s screen in the round’s coding view (reported by their browser)'),
      wordsCoded: z.number().int().describe('words covered by at least one of the participant’s segments'),
      segments: z.number().int(),
      done: z.boolean(),
      doneAt: z.string().nullable(),
    }),
  ),
});
export const DoneBody = z.object({ done: z.boolean() });
export const ReadBody = z.strictObject({ words: z.number().int().min(0).max(100_000_000).describe('words of the text shown on screen so far') });

// Supervision (issue 9)
export const AssignBody = z.object({ textId: z.string().uuid(), userId: z.string().uuid() });
export const ReviewBody = z.object({
  state: z.enum(['assigned', 'returned', 'accepted']).describe('returned: with feedback, look again; accepted: done; assigned: back to coding'),
  note: z.string().max(5000).default('').describe('what to look at again (with a return), or a closing word'),
});
export const ShareBody = z.object({ shared: z.boolean().describe('let the assignee read the text’s reference layer and compare against it') });
export const ReferenceBody = z.object({ layer: z.string().uuid().nullable().describe('the reference layer room, or null to clear') });
export const SupervisionSettingsBody = z.object({
  toleranceWords: z.number().int().min(0).max(1000),
  driftThreshold: z.number().min(0).max(2).describe('flag drift when agreement falls by more than this from one round to the next'),
});
