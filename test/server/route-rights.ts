/**
 * Who may succeed on each HTTP route: the one expectations table of the authorisation matrix
 * (authorization-matrix.test.ts). Keys are `METHOD /path` exactly as the app registers them; the
 * matrix reads the app's real route list, so a route without an entry here fails the suite.
 * Adding a route = adding one line: `'POST /api/things/:thingId': ['owner', 'lead'],`.
 *
 * Values: 'anyone' (no session needed), 'signed-in' (any account, member or not), or the study roles
 * that may succeed on the study the route names (through its study, text, document, round…).
 * Everyone else must be refused (401 for no session, 403/404 for a member without the right or a
 * stranger to the study); the role rules follow access/policy.ts and the brief (DESIGN §6).
 */
export const STUDY_ROLES = ['owner', 'lead', 'coder', 'trainee', 'observer'] as const;
export type StudyRole = (typeof STUDY_ROLES)[number];
export type Rights = 'anyone' | 'signed-in' | readonly StudyRole[];

const members = STUDY_ROLES;
const managers = ['owner', 'lead'] as const;

export const ROUTE_RIGHTS: Record<string, Rights> = {
  'GET /api/health': 'anyone',
  'GET /api/openapi.json': 'anyone',
  'POST /api/session': 'anyone',
  'DELETE /api/session': 'anyone',
  'PUT /api/me/password': 'signed-in',
  'GET /api/me': 'signed-in',
  'GET /api/setup': 'anyone',
  'POST /api/setup': 'anyone', // only while no account exists (409 after)
  'GET /api/invitations/:token': 'anyone', // the token is the right
  'POST /api/invitations/:token/accept': 'anyone',
  'GET /api/password-resets/:token': 'anyone',
  'POST /api/password-resets/:token': 'anyone',
  'GET /api/exchange/losses': 'anyone', // what the exchange standard cannot carry: no study data
  'GET /*': 'anyone', // the web app's files
  'GET /api/studies': 'signed-in', // one's own studies only
  'POST /api/studies': 'signed-in',
  'POST /api/studies/import': 'signed-in', // a new study of one's own
  'GET /api/studies/:studyId': members,
  'PATCH /api/studies/:studyId': ['owner'],
  'GET /api/studies/:studyId/members': members,
  'POST /api/studies/:studyId/members': managers,
  'PATCH /api/studies/:studyId/members/:userId': managers,
  'POST /api/studies/:studyId/members/:userId/reset-link': managers,
  'DELETE /api/studies/:studyId/members/:userId': managers,
  'POST /api/studies/:studyId/invitations': managers,
  'GET /api/studies/:studyId/invitations': managers,
  'DELETE /api/studies/:studyId/invitations/:invitationId': managers,
  'GET /api/studies/:studyId/audit': managers,
  'GET /api/studies/:studyId/export': managers,
  'POST /api/studies/:studyId/import': managers,
  'GET /api/studies/:studyId/retrieval': members,
  'GET /api/studies/:studyId/tables': members,
  'GET /api/studies/:studyId/texts': members,
  'POST /api/studies/:studyId/texts': managers,
  'POST /api/studies/:studyId/texts/import/preview': managers,
  'POST /api/studies/:studyId/texts/import': managers,
  'GET /api/studies/:studyId/agreement': ['owner', 'lead', 'observer'],
  'GET /api/studies/:studyId/feedback': members,
  'GET /api/studies/:studyId/comments/events': members,
  'GET /api/texts/:textId': members,
  'GET /api/texts/:textId/opening': members, // each gets only the rooms their sync upgrade would open (opening.test.ts)
  'GET /api/texts/:textId/segments': members,
  'GET /api/texts/:textId/comparison': members,
  'GET /api/texts/:textId/comments': members,
  'POST /api/texts/:textId/comments': members,
  'POST /api/comments/:commentId/resolve': members,
  'POST /api/comments/:commentId/reopen': members,
  'POST /api/documents/:room/versions': managers,
  'GET /api/documents/:room/versions': members,
  'GET /api/documents/:room/versions/:versionId': members,
  'POST /api/studies/:studyId/rounds': managers,
  'GET /api/studies/:studyId/rounds': members,
  'GET /api/rounds/:roundId': members,
  'POST /api/rounds/:roundId/reveal': managers,
  'POST /api/rounds/:roundId/close': managers,
  'POST /api/rounds/:roundId/texts/:textId/done': members, // a participant marks their own text done
  'DELETE /api/rounds/:roundId/texts/:textId/done': members,
  'PUT /api/rounds/:roundId/texts/:textId/done': members,
  // A round's participants (any member role) see their own progress, and its agreement after the reveal.
  'GET /api/rounds/:roundId/progress': members,
  'GET /api/rounds/:roundId/agreement': members,
  'GET /api/rounds/:roundId/report': members,
  'PUT /api/rounds/:roundId/texts/:textId/read': members, // a participant reports their own words read
  'GET /api/studies/:studyId/events': members, // live study changes (texts added, an import)
  // Deletion and de-identification (issue 12).
  'DELETE /api/studies/:studyId': ['owner'],
  'DELETE /api/texts/:textId': managers,
  'POST /api/studies/:studyId/deid/candidates': managers,
  'POST /api/studies/:studyId/deid/apply': managers,
  'POST /api/studies/:studyId/deid/purge': managers,
  'GET /api/studies/:studyId/deid/scan': managers,
  'GET /api/studies/:studyId/pseudonyms': ['owner'], // the key: owner only
  'POST /api/studies/:studyId/pseudonyms/export': ['owner'],
  'DELETE /api/studies/:studyId/pseudonyms': ['owner'],
  // Supervision (issue 9): supervisors manage; anyone sees their own assignments and a text's reference id.
  'GET /api/studies/:studyId/assignments': members,
  'POST /api/studies/:studyId/assignments': managers,
  'DELETE /api/studies/:studyId/assignments/:textId/:userId': managers,
  'POST /api/studies/:studyId/assignments/:textId/:userId/review': managers,
  'POST /api/studies/:studyId/assignments/:textId/:userId/share': managers,
  'GET /api/studies/:studyId/supervision/settings': members,
  'PUT /api/studies/:studyId/supervision/settings': managers,
  'GET /api/studies/:studyId/supervision/progress': managers,
  'GET /api/texts/:textId/reference': members,
  'PUT /api/texts/:textId/reference': managers,
};
